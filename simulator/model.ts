// Booth model: a pure, seeded simulation of one booth's environment and controller cycle. No MQTT, no timers:
// the caller passes wall-clock time to next(), which advances the physics by (elapsed × speed) of simulated
// time and returns one reading (plus the exact payload to publish). The same seed, options and sequence of
// next() times always give the same series.
//
// Physics, kept simple on purpose:
// - Cycle: idle → spray → flash → (spray → flash)… → bake ramp → bake hold → cool → idle (downdraft booths);
//   the prep deck goes idle → spray → flash → … → idle without bake. Bake ramp and hold both report mode "bake".
// - Shop ambient air: daily sinusoid of temperature and relative humidity (RH), plus a mean-reverting random
//   walk (Ornstein–Uhlenbeck) on RH and an optional RH trend (`humidityDriftPct`), steady or in episodes (drift.ts).
// - Booth air temperature: first-order lag towards the mode's target (ambient + a little, or the bake set point).
//   Panel (object) temperature: first-order lag towards the air temperature. Lags use the exact discretisation
//   x += (target − x)(1 − e^(−dt/τ)), so they stay stable at any speed.
// - Booth RH: the absolute humidity of the intake air is kept, RH = 100·e / es(T_air), with the saturation vapour
//   pressure es from the Magnus form (WMO-No. 8, 2018 edition, Annex 4.B: es = 6.112·exp(17.62·T/(243.12 + T)) hPa
//   over water, −45…60 °C; used up to the bake temperatures as an approximation).
// - Filter pressure drops load up with fan (intake) and spray (exhaust) time and are reported at the current
//   flow, dp = load · (v / v_spray)^1.5.
// - Noise on every channel, sensor dropouts (a channel missing for a few seconds, or a few seconds without any
//   message), a fixed per-booth device clock skew, and on request broken messages (see faults.ts).

import { kindForBooth, profileFor, type BoothKind, type BoothProfile } from './booths'
import { driftTrendPct, type DriftEpisodes } from './drift'
import { makeFault, type FaultKind } from './faults'
import { hashSeed, Random, type SeedInput } from './prng'
import {
  isoTs,
  readingPayload,
  READING_CHANNELS,
  WIRE_LIMITS,
  type Mode,
  type Reading,
  type ReadingChannel,
} from './wire'

/** Internal cycle phase; `bakeRamp` and `bakeHold` both report mode `bake`. */
export type Phase = 'idle' | 'spray' | 'flash' | 'bakeRamp' | 'bakeHold' | 'cool'

export const PHASE_MODE: Readonly<Record<Phase, Mode>> = {
  idle: 'idle',
  spray: 'spray',
  flash: 'flash',
  bakeRamp: 'bake',
  bakeHold: 'bake',
  cool: 'cool',
}

export interface BoothModelOptions {
  /** Booth slug, e.g. `downdraft-1`. */
  booth: string
  /** Seed of the run; each booth derives its own streams from (seed, booth). */
  seed: SeedInput
  /** Time compression of the cycle and drift dynamics (1 = real time). Default 1. */
  speed?: number
  /** Wall-clock time (ms since epoch) the simulation starts at; the first next() call is measured from it. */
  startMs: number
  /** Booth kind; default from the slug (see kindForBooth). */
  kind?: BoothKind
  /** Fraction (0…1) of messages replaced by a broken one. Default 0. */
  faults?: number
  /** Sensor dropouts (a missing channel, or a short gap without messages). Default true. */
  dropouts?: boolean
  /** Mean rate of single-channel dropouts, per hour of wall-clock time. Default 6. */
  channelDropoutsPerHour?: number
  /** Mean rate of message gaps (a few seconds without any message), per hour of wall-clock time. Default 2. */
  gapsPerHour?: number
  /** Device clock skew, ms; default drawn from the seed in ±5 s. Clamped to ±60 s. */
  clockSkewMs?: number
  /**
   * Linear trend of the outside-air (intake) RH, percentage points per simulated hour, on top of the daily
   * sinusoid and the random walk; intake RH stays within 10–95 %. Default 0. At speed 30 a value of 5 moves the
   * booth RH by roughly 4 points every two minutes, enough for a humidity drift alert in a short demo.
   */
  humidityDriftPct?: number
  /**
   * When set, the humidity drift comes in episodes (weather that comes and goes) instead of a trend for ever:
   * it rises at `humidityDriftPct` up to `peakPct`, holds, falls back at the same rate and rests.
   */
  humidityDriftEpisodes?: DriftEpisodes
  /** Amplitude of the daily intake RH swing, percentage points. Default 6. */
  humidityDailyAmplitudePct?: number
  /** Spread (stationary standard deviation) of the intake RH random walk, percentage points. Default 2.5. */
  humidityWalkSdPct?: number
  /** Mean intake RH, %. Default 60. */
  humidityMeanPct?: number
  /** Phase at start; default drawn from the seed (idle, spray or flash, part-way through). */
  initialPhase?: Phase
  /** Simulated local hour of day at start (drives the daily sinusoids). Default 8. */
  startHourOfDay?: number
  /** First sequence number. Default 1. */
  startSeq?: number
}

/** Forced conditions. `undefined` leaves a field as it is, `null` releases it. */
export interface BoothOverride {
  airTempC?: number | null
  rhPct?: number | null
  airflowMps?: number | null
  mode?: Mode | null
}

export interface BoothStep {
  /** The wall-clock time passed to next(). */
  nowMs: number
  /** Device timestamp (wall clock + skew), ms. */
  tsMs: number
  /** The measured reading; null during a message gap. With a fault, this is the reading before corruption. */
  reading: Reading | null
  /** Exact MQTT payload to publish; null = publish nothing this time. */
  payload: string | null
  /** Set when the payload is a deliberately broken message. */
  fault?: FaultKind
  /** Set when the controller mode changed since the previous step (the new mode). */
  modeChanged?: Mode
  mode: Mode
  phase: Phase
  /** True when no message is sent this time (a simulated dropout gap). */
  gap: boolean
}

/** Noise-free internal state, for tests and summaries. */
export interface BoothState {
  booth: string
  kind: BoothKind
  phase: Phase
  mode: Mode
  /** Coat number within the current job (0 before the first spray). */
  coat: number
  coatsPlanned: number
  /** Simulated seconds since start. */
  simElapsedS: number
  /** Simulated seconds spent in the current phase. */
  phaseElapsedS: number
  ambientTempC: number
  intakeRhPct: number
  airTempC: number
  panelTempC: number
  rhPct: number
  airflowMps: number
  boothDpPa: number
  intakeFilterLoadPa: number
  exhaustFilterLoadPa: number
  heaterOn: boolean
  skewMs: number
  seq: number
  override: Readonly<BoothOverride>
}

export interface BoothModel {
  readonly booth: string
  readonly kind: BoothKind
  /** Device clock skew, ms (ts = wall clock + skew). */
  readonly skewMs: number
  /** Current controller mode. */
  readonly mode: Mode
  next(nowMs: number): BoothStep
  setOverride(override: BoothOverride): void
  clearOverride(): void
  state(): BoothState
}

/** Saturation vapour pressure over water, hPa, Magnus form (WMO-No. 8, Annex 4.B). T in °C. */
export function saturationVapourPressureHpa(tempC: number): number {
  return 6.112 * Math.exp((17.62 * tempC) / (243.12 + tempC))
}

/** RH (%) of air at `tempC` holding vapour pressure `vapourHpa`, clamped to 0…100. */
export function rhFromVapour(vapourHpa: number, tempC: number): number {
  const rh = (100 * vapourHpa) / saturationVapourPressureHpa(tempC)
  return Math.min(100, Math.max(0, rh))
}

const SUBSTEP_MAX_S = 10
const SUBSTEPS_MAX = 5000
/** Random-walk parameters of the intake RH: default stationary standard deviation (points), reversion time (s). */
const RH_WALK_SD = 2.5
const RH_WALK_TAU_S = 6 * 3600
const AMBIENT_MEAN_C = 19
const AMBIENT_AMPLITUDE_K = 2.5
/** Time constant of fan and pressure changes, s. */
const FAN_TAU_S = 20
/** Gain of the bake controller holding the object temperature (air target = hold + gain·error). */
const HOLD_GAIN = 2
const DEFAULT_SKEW_LIMIT_MS = 5000

/** Noise standard deviation and reporting resolution (decimal places) per numeric channel. */
const CHANNEL_NOISE = {
  airTempC: { sd: 0.06, decimals: 1 },
  rhPct: { sd: 0.25, decimals: 1 },
  panelTempC: { sd: 0.1, decimals: 1 },
  airflowMps: { sd: 0.006, decimals: 2 },
  boothDpPa: { sd: 0.15, decimals: 1 },
  intakeFilterDpPa: { sd: 0.8, decimals: 0 },
  exhaustFilterDpPa: { sd: 1.0, decimals: 0 },
} as const

function round(value: number, decimals: number): number {
  const r = Number(value.toFixed(decimals))
  return Object.is(r, -0) ? 0 : r
}

function clamp(value: number, min: number, max: number): number {
  return Math.min(max, Math.max(min, value))
}

function lag(current: number, target: number, dtS: number, tauS: number): number {
  return current + (target - current) * (1 - Math.exp(-dtS / tauS))
}

function finiteOr(value: number | undefined, fallback: number, name: string): number {
  if (value === undefined) return fallback
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be a finite number, got ${value}`)
  return value
}

export function createBoothModel(options: BoothModelOptions): BoothModel {
  const booth = options.booth
  const kind = options.kind ?? kindForBooth(booth)
  const profile: BoothProfile = profileFor(kind)
  const speed = finiteOr(options.speed, 1, 'speed')
  if (speed <= 0) throw new RangeError(`speed must be positive, got ${speed}`)
  const startMs = options.startMs
  if (!Number.isFinite(startMs)) throw new RangeError(`startMs must be a finite epoch time in ms, got ${startMs}`)
  const faultFraction = finiteOr(options.faults, 0, 'faults')
  if (faultFraction < 0 || faultFraction > 1) throw new RangeError(`faults must be within 0…1, got ${faultFraction}`)
  const dropouts = options.dropouts ?? true
  const channelDropoutsPerHour = Math.max(0, finiteOr(options.channelDropoutsPerHour, 6, 'channelDropoutsPerHour'))
  const gapsPerHour = Math.max(0, finiteOr(options.gapsPerHour, 2, 'gapsPerHour'))
  const humidityDriftPct = finiteOr(options.humidityDriftPct, 0, 'humidityDriftPct')
  const humidityAmplitude = finiteOr(options.humidityDailyAmplitudePct, 6, 'humidityDailyAmplitudePct')
  const humidityMean = finiteOr(options.humidityMeanPct, 60, 'humidityMeanPct')
  const walkSd = Math.max(0, finiteOr(options.humidityWalkSdPct, RH_WALK_SD, 'humidityWalkSdPct'))
  const startHour = finiteOr(options.startHourOfDay, 8, 'startHourOfDay')

  // Independent streams, so that e.g. turning faults on does not change the clean series.
  const rngSetup = new Random(hashSeed(options.seed, booth, 'setup'))
  const rngCycle = new Random(hashSeed(options.seed, booth, 'cycle'))
  const rngEnv = new Random(hashSeed(options.seed, booth, 'env'))
  const rngNoise = new Random(hashSeed(options.seed, booth, 'noise'))
  const rngDropout = new Random(hashSeed(options.seed, booth, 'dropout'))
  const rngFault = new Random(hashSeed(options.seed, booth, 'fault'))

  const drawnSkew = Math.round(rngSetup.uniform(-DEFAULT_SKEW_LIMIT_MS, DEFAULT_SKEW_LIMIT_MS))
  const skewMs = Math.round(
    clamp(finiteOr(options.clockSkewMs, drawnSkew, 'clockSkewMs'), -WIRE_LIMITS.maxSkewMs, WIRE_LIMITS.maxSkewMs),
  )
  // Per-booth variation of the design values.
  const airflowFactor = rngSetup.uniform(0.94, 1.06)
  const dpFactor = rngSetup.uniform(0.9, 1.1)
  const ambientOffsetK = rngSetup.uniform(-0.8, 0.8)

  // --- state ---
  let simElapsedS = 0
  let phase = 'idle' as Phase
  let phaseElapsedS = 0
  let phaseDurationS = 0
  let coat = 0
  let coatsPlanned = 0
  let rhWalk = rngEnv.normal(0, walkSd * 0.5)
  let intakeLoad = rngSetup.uniform(...profile.intakeFilterStartPa)
  let exhaustLoad = rngSetup.uniform(...profile.exhaustFilterStartPa)
  let seq = Math.max(0, Math.trunc(finiteOr(options.startSeq, 1, 'startSeq')))
  let lastNowMs = startMs
  let lastTsMs = Number.NEGATIVE_INFINITY
  let lastReportedMode: Mode = 'idle'
  let gapUntilMs = Number.NEGATIVE_INFINITY
  const channelDownUntil = new Map<ReadingChannel, number>()
  const override: BoothOverride = {}

  const minutes = (range: readonly [number, number], rng: Random): number => rng.uniform(range[0], range[1]) * 60

  function hourOfDay(): number {
    return startHour + simElapsedS / 3600
  }
  function ambientTempC(): number {
    // Warmest mid-afternoon (15:00).
    return AMBIENT_MEAN_C + ambientOffsetK + AMBIENT_AMPLITUDE_K * Math.sin((2 * Math.PI * (hourOfDay() - 9)) / 24)
  }
  function intakeRhPct(): number {
    // Most humid in the early morning, driest mid-afternoon.
    const daily = -humidityAmplitude * Math.sin((2 * Math.PI * (hourOfDay() - 9)) / 24)
    const trend = driftTrendPct(simElapsedS / 3600, humidityDriftPct, options.humidityDriftEpisodes)
    return clamp(humidityMean + daily + rhWalk + trend, 10, 95)
  }
  function vapourHpa(): number {
    const t = ambientTempC()
    return (intakeRhPct() / 100) * saturationVapourPressureHpa(t)
  }

  function enterPhase(next: Phase): void {
    phase = next
    phaseElapsedS = 0
    switch (next) {
      case 'idle':
        phaseDurationS = minutes(profile.idleMin, rngCycle)
        coat = 0
        coatsPlanned = 0
        break
      case 'spray':
        if (coatsPlanned === 0) coatsPlanned = rngCycle.int(profile.coats[0], profile.coats[1])
        coat = Math.min(coat + 1, Math.max(coatsPlanned, 1))
        phaseDurationS = minutes(profile.sprayMin, rngCycle)
        break
      case 'flash':
        phaseDurationS = minutes(coat < coatsPlanned ? profile.flashMin : profile.finalFlashMin, rngCycle)
        break
      case 'bakeRamp':
        phaseDurationS = (profile.bake?.rampMaxMin ?? 30) * 60
        break
      case 'bakeHold':
        phaseDurationS = (profile.bake?.holdMin ?? 30) * 60
        break
      case 'cool':
        phaseDurationS = minutes(profile.coolMin, rngCycle)
        break
    }
  }

  // Initial phase and conditions (shop ambient; a booth never starts mid-bake unless asked to).
  {
    const initial: Phase =
      options.initialPhase ?? rngSetup.weighted<'idle' | 'spray' | 'flash'>({ idle: 2, spray: 1, flash: 1 })
    if (initial === 'spray' || initial === 'flash') {
      coatsPlanned = rngCycle.int(profile.coats[0], profile.coats[1])
      coat = 0
      enterPhase('spray')
      if (initial === 'flash') enterPhase('flash')
    } else {
      enterPhase(initial)
    }
    if (options.initialPhase === undefined) phaseElapsedS = rngSetup.uniform(0, 0.8) * phaseDurationS
  }
  let airTempC = ambientTempC() + airAbove(phase)
  if (phase === 'bakeHold' && profile.bake) airTempC = profile.bake.holdObjectC
  let panelTempC = phase === 'bakeHold' && profile.bake ? profile.bake.holdObjectC : airTempC - 0.3
  let airflowMps = profile.airflowMps[modeKey(phase)] * airflowFactor
  let boothDpPa = profile.boothDpPa[modeKey(phase)] * dpFactor
  lastReportedMode = currentMode()

  function modeKey(p: Phase): 'idle' | 'spray' | 'flash' | 'bake' | 'cool' {
    return PHASE_MODE[p]
  }
  function airAbove(p: Phase): number {
    const key = modeKey(p)
    return key === 'bake' ? 0 : profile.airAboveAmbientK[key]
  }
  function currentMode(): Mode {
    return override.mode ?? PHASE_MODE[phase]
  }
  function heaterOn(): boolean {
    return profile.hasHeater && profile.bake !== undefined && (phase === 'bakeRamp' || phase === 'bakeHold')
  }
  function sprayFlowMps(): number {
    return profile.airflowMps.spray * airflowFactor
  }

  function airTarget(): number {
    const bake = profile.bake
    if (bake && heaterOn()) {
      if (phase === 'bakeRamp') return bake.rampAirC
      const error = bake.holdObjectC - panelTempC
      return clamp(bake.holdObjectC + HOLD_GAIN * error, bake.holdObjectC - 5, bake.rampAirC)
    }
    return ambientTempC() + airAbove(phase)
  }

  /** Next phase when the current one is over, or undefined to stay. */
  function transition(): Phase | undefined {
    switch (phase) {
      case 'idle':
        return phaseElapsedS >= phaseDurationS ? 'spray' : undefined
      case 'spray':
        return phaseElapsedS >= phaseDurationS ? 'flash' : undefined
      case 'flash':
        if (phaseElapsedS < phaseDurationS) return undefined
        if (coat < coatsPlanned) return 'spray'
        return profile.bake ? 'bakeRamp' : 'idle'
      case 'bakeRamp': {
        const bake = profile.bake
        if (!bake) return 'cool'
        const ready = panelTempC >= bake.holdObjectC - bake.rampDoneBelowK
        return ready || phaseElapsedS >= phaseDurationS ? 'bakeHold' : undefined
      }
      case 'bakeHold':
        return phaseElapsedS >= phaseDurationS ? 'cool' : undefined
      case 'cool': {
        if (phaseElapsedS >= profile.coolMaxMin * 60) return 'idle'
        const cooled = airTempC <= ambientTempC() + 6
        return phaseElapsedS >= phaseDurationS && cooled ? 'idle' : undefined
      }
    }
  }

  function integrate(dtS: number): void {
    simElapsedS += dtS
    // Intake RH random walk (exact Ornstein–Uhlenbeck step).
    const decay = Math.exp(-dtS / RH_WALK_TAU_S)
    rhWalk = rhWalk * decay + walkSd * Math.sqrt(1 - decay * decay) * rngEnv.normal()

    const key = modeKey(phase)
    airTempC = override.airTempC ?? lag(airTempC, airTarget(), dtS, profile.airTauS[key])
    panelTempC = lag(panelTempC, airTempC, dtS, profile.panelTauS)
    const flowTarget = profile.airflowMps[key] * airflowFactor * (1 - 0.1 * loadFraction())
    airflowMps = lag(airflowMps, flowTarget, dtS, FAN_TAU_S)
    boothDpPa = lag(boothDpPa, profile.boothDpPa[key] * dpFactor, dtS, FAN_TAU_S)

    const flow = override.airflowMps ?? airflowMps
    const hours = dtS / 3600
    intakeLoad = Math.min(600, intakeLoad + profile.intakeLoadPaPerHour * hours * Math.min(1, flow / sprayFlowMps()))
    if (phase === 'spray') exhaustLoad = Math.min(600, exhaustLoad + profile.exhaustLoadPaPerSprayHour * hours)

    // Cycle: elapsed time is frozen while a mode is forced (a forced bake may still go from ramp to hold).
    if (override.mode === undefined || override.mode === null) {
      phaseElapsedS += dtS
      const next = transition()
      if (next !== undefined) enterPhase(next)
    } else if (phase === 'bakeRamp') {
      phaseElapsedS += dtS
      const next = transition()
      if (next === 'bakeHold') enterPhase(next)
    }
  }

  function loadFraction(): number {
    // 0 when the exhaust filter is fresh, 1 at 300 Pa.
    return clamp((exhaustLoad - 100) / 200, 0, 1)
  }

  function advance(dtRealMs: number): void {
    const dtSim = (dtRealMs / 1000) * speed
    if (!(dtSim > 0)) return
    const n = Math.min(SUBSTEPS_MAX, Math.max(1, Math.ceil(dtSim / SUBSTEP_MAX_S)))
    const h = dtSim / n
    for (let i = 0; i < n; i++) integrate(h)
  }

  function filterDp(load: number, flow: number): number {
    return load * Math.pow(Math.max(0, flow) / sprayFlowMps(), 1.5)
  }

  function measured(channel: keyof typeof CHANNEL_NOISE, trueValue: number): number {
    const spec = CHANNEL_NOISE[channel]
    // Always draw, so the noise stream does not depend on overrides or dropouts.
    const noise = rngNoise.normal(0, spec.sd)
    return round(trueValue + noise, spec.decimals)
  }

  function buildReading(tsMs: number): Reading {
    const t = WIRE_LIMITS
    const flow = override.airflowMps ?? airflowMps
    const rhTrue = rhFromVapour(vapourHpa(), airTempC)
    const airM = measured('airTempC', airTempC)
    const rhM = measured('rhPct', rhTrue)
    const panelM = measured('panelTempC', panelTempC)
    const flowM = measured('airflowMps', flow)
    const dpM = measured('boothDpPa', boothDpPa)
    const intakeM = measured('intakeFilterDpPa', filterDp(intakeLoad, flow))
    const exhaustM = measured('exhaustFilterDpPa', filterDp(exhaustLoad, flow))

    const reading: Reading = { ts: isoTs(tsMs), seq }
    reading.airTempC =
      override.airTempC != null ? round(clamp(override.airTempC, t.tempMinC, t.tempMaxC), 1) : clamp(airM, t.tempMinC, t.tempMaxC)
    reading.rhPct =
      override.rhPct != null ? round(clamp(override.rhPct, t.rhMinPct, t.rhMaxPct), 1) : clamp(rhM, t.rhMinPct, t.rhMaxPct)
    reading.panelTempC = clamp(panelM, t.tempMinC, t.tempMaxC)
    reading.airflowMps =
      override.airflowMps != null ? round(Math.max(t.airflowMinMps, override.airflowMps), 2) : Math.max(t.airflowMinMps, flowM)
    reading.boothDpPa = dpM
    reading.intakeFilterDpPa = Math.max(0, intakeM)
    reading.exhaustFilterDpPa = Math.max(0, exhaustM)
    if (profile.hasHeater) reading.heaterOn = heaterOn()
    return reading
  }

  function forced(channel: ReadingChannel): boolean {
    return (
      (channel === 'airTempC' && override.airTempC != null) ||
      (channel === 'rhPct' && override.rhPct != null) ||
      (channel === 'airflowMps' && override.airflowMps != null)
    )
  }

  function applyChannelDropouts(reading: Reading, nowMs: number, dtRealMs: number): void {
    if (!dropouts) return
    const start = 1 - Math.exp(-(channelDropoutsPerHour * dtRealMs) / 3_600_000)
    if (rngDropout.chance(start)) {
      const present = READING_CHANNELS.filter((c) => reading[c] !== undefined && !forced(c))
      if (present.length > 0) {
        const channel = present[rngDropout.int(0, present.length - 1)]
        if (channel !== undefined) channelDownUntil.set(channel, nowMs + rngDropout.uniform(2000, 20_000))
      }
    }
    for (const [channel, until] of channelDownUntil) {
      if (nowMs >= until) channelDownUntil.delete(channel)
      else if (!forced(channel)) delete reading[channel]
    }
  }

  function inGap(nowMs: number, dtRealMs: number): boolean {
    if (!dropouts) return false
    if (nowMs < gapUntilMs) return true
    const start = 1 - Math.exp(-(gapsPerHour * dtRealMs) / 3_600_000)
    if (rngDropout.chance(start)) {
      gapUntilMs = nowMs + rngDropout.uniform(3000, 10_000)
      return true
    }
    return false
  }

  function next(nowMs: number): BoothStep {
    if (!Number.isFinite(nowMs)) throw new RangeError(`nowMs must be finite, got ${nowMs}`)
    const dtRealMs = Math.max(0, nowMs - lastNowMs)
    lastNowMs = Math.max(lastNowMs, nowMs)
    advance(dtRealMs)

    const mode = currentMode()
    const modeChanged = mode !== lastReportedMode ? mode : undefined
    lastReportedMode = mode
    // Device timestamps strictly increase (the server is idempotent on booth + device timestamp).
    const tsMs = Math.max(nowMs + skewMs, lastTsMs + 1)
    const base = { nowMs, tsMs, mode, phase, ...(modeChanged ? { modeChanged } : {}) }

    if (inGap(nowMs, dtRealMs)) return { ...base, reading: null, payload: null, gap: true }

    lastTsMs = tsMs
    const reading = buildReading(tsMs)
    seq += 1
    applyChannelDropouts(reading, nowMs, dtRealMs)

    if (faultFraction > 0 && rngFault.chance(faultFraction)) {
      const fault = makeFault(reading, rngFault)
      return { ...base, reading, payload: fault.payload, fault: fault.kind, gap: false }
    }
    return { ...base, reading, payload: readingPayload(reading), gap: false }
  }

  function setOverride(o: BoothOverride): void {
    for (const key of ['airTempC', 'rhPct', 'airflowMps'] as const) {
      const value = o[key]
      if (value === undefined) continue
      if (value === null) delete override[key]
      else if (!Number.isFinite(value)) throw new RangeError(`override ${key} must be finite, got ${value}`)
      else override[key] = value
    }
    if (o.mode === null) {
      delete override.mode
    } else if (o.mode !== undefined) {
      override.mode = o.mode
      if (PHASE_MODE[phase] !== o.mode) {
        const target: Phase = o.mode === 'bake' ? 'bakeRamp' : o.mode
        if (target === 'spray' && coatsPlanned === 0) coatsPlanned = rngCycle.int(profile.coats[0], profile.coats[1])
        enterPhase(target)
      }
    }
  }

  function clearOverride(): void {
    setOverride({ airTempC: null, rhPct: null, airflowMps: null, mode: null })
  }

  function state(): BoothState {
    return {
      booth,
      kind,
      phase,
      mode: currentMode(),
      coat,
      coatsPlanned,
      simElapsedS,
      phaseElapsedS,
      ambientTempC: ambientTempC(),
      intakeRhPct: intakeRhPct(),
      airTempC,
      panelTempC,
      rhPct: rhFromVapour(vapourHpa(), airTempC),
      airflowMps,
      boothDpPa,
      intakeFilterLoadPa: intakeLoad,
      exhaustFilterLoadPa: exhaustLoad,
      heaterOn: heaterOn(),
      skewMs,
      seq,
      override: { ...override },
    }
  }

  return {
    booth,
    kind,
    skewMs,
    get mode() {
      return currentMode()
    },
    next,
    setOverride,
    clearOverride,
    state,
  }
}
