// Public API of the booth simulator (see README.md).
export { boothSpecs, DEMO_BOOTHS, DEMO_SHOP_NAME, DEMO_SITE, kindForBooth, profileFor } from './booths'
export type { BoothKind, BoothProfile, BoothSpec } from './booths'
export { FAULT_KINDS, makeFault } from './faults'
export type { FaultKind, FaultyMessage } from './faults'
export { createBoothModel, PHASE_MODE, rhFromVapour, saturationVapourPressureHpa } from './model'
export type { BoothModel, BoothModelOptions, BoothOverride, BoothState, BoothStep, Phase } from './model'
export { hashSeed, mulberry32, Random } from './prng'
export type { SeedInput } from './prng'
export { DEFAULT_MQTT_URL, startSimulator } from './publisher'
export type { BoothInfo, BoothStats, LogLevel, SimulatorHandle, SimulatorOptions, SimulatorStats } from './publisher'
export {
  boothTopics,
  deviceIdFor,
  isoTs,
  modePayload,
  MODES,
  READING_CHANNELS,
  readingPayload,
  STATUS_OFFLINE,
  STATUS_ONLINE,
  WIRE_LIMITS,
} from './wire'
export type { BoothTopics, Mode, ModeMessage, Reading, ReadingChannel } from './wire'
