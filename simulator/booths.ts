// Booth catalogue of the simulator: the demo shop's booths and the physical profile of each booth kind.
// All values are invented, within the usual ranges for refinish spray booths.

export type BoothKind = 'downdraft' | 'prep-deck'

export const DEMO_SITE = 'larkspur'
export const DEMO_SHOP_NAME = 'Larkspur Collision & Refinish'

/** The demo shop's booths, in order. */
export const DEMO_BOOTHS = [
  { booth: 'downdraft-1', kind: 'downdraft', name: 'Downdraft booth 1' },
  { booth: 'downdraft-2', kind: 'downdraft', name: 'Downdraft booth 2' },
  { booth: 'prep-deck', kind: 'prep-deck', name: 'Prep deck' },
] as const satisfies readonly { booth: string; kind: BoothKind; name: string }[]

export interface BoothSpec {
  booth: string
  kind: BoothKind
}

/**
 * The first `n` booths of a simulator run: the three demo booths, then generated `sim-booth-<i>` booths where
 * i is the booth's 1-based position in the run (the fourth booth is `sim-booth-4`). Every third generated booth
 * (i divisible by 3) is a prep deck, the others are downdraft booths.
 */
export function boothSpecs(n: number): BoothSpec[] {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`booth count must be a positive integer, got ${n}`)
  const specs: BoothSpec[] = []
  for (let i = 1; i <= n; i++) {
    const demo = DEMO_BOOTHS[i - 1]
    if (demo) specs.push({ booth: demo.booth, kind: demo.kind })
    else specs.push({ booth: `sim-booth-${i}`, kind: i % 3 === 0 ? 'prep-deck' : 'downdraft' })
  }
  return specs
}

/** Kind of a booth from its slug: the demo booths are known, `prep…` slugs are prep decks, the rest downdraft. */
export function kindForBooth(booth: string): BoothKind {
  const demo = DEMO_BOOTHS.find((b) => b.booth === booth)
  if (demo) return demo.kind
  const generated = /^sim-booth-(\d+)$/.exec(booth)
  if (generated?.[1] !== undefined) return Number(generated[1]) % 3 === 0 ? 'prep-deck' : 'downdraft'
  return booth.startsWith('prep') ? 'prep-deck' : 'downdraft'
}

type Range = readonly [min: number, max: number]
type PerPhase = Readonly<Record<'idle' | 'spray' | 'flash' | 'bake' | 'cool', number>>

export interface BakeProfile {
  /** Air set point while ramping up (overshoots the object target to heat the panel faster), °C. */
  rampAirC: number
  /** Object (panel) temperature held during the bake, °C. */
  holdObjectC: number
  /** Hold duration at speed 1, simulated minutes. */
  holdMin: number
  /** The ramp ends when the panel is this close to the object target, K. */
  rampDoneBelowK: number
  /** Safety limit on the ramp duration, simulated minutes. */
  rampMaxMin: number
}

export interface BoothProfile {
  kind: BoothKind
  /** Whether the booth has a heater (and reports `heaterOn`). */
  hasHeater: boolean
  bake: BakeProfile | undefined
  /** Coats per job (spray/flash pairs). */
  coats: readonly [min: number, max: number]
  idleMin: Range
  sprayMin: Range
  flashMin: Range
  /** Flash after the last coat (before the bake, or before the booth goes idle). */
  finalFlashMin: Range
  coolMin: Range
  coolMaxMin: number
  /** Nominal air velocity per mode, m/s (spray value is the booth's design velocity). */
  airflowMps: PerPhase
  /** Booth differential pressure per mode, Pa (slightly positive against the shop). */
  boothDpPa: PerPhase
  /** Air temperature above the shop ambient per mode (lights, fans), K. */
  airAboveAmbientK: Readonly<Record<'idle' | 'spray' | 'flash' | 'cool', number>>
  /** First-order time constants, simulated seconds. */
  airTauS: PerPhase
  panelTauS: number
  /** Filter pressure drop at spray flow when fresh, Pa. */
  intakeFilterStartPa: Range
  exhaustFilterStartPa: Range
  /** Loading rates: intake per fan-running hour, exhaust per spray hour, Pa/h (simulated). */
  intakeLoadPaPerHour: number
  exhaustLoadPaPerSprayHour: number
}

const DOWNDRAFT: BoothProfile = {
  kind: 'downdraft',
  hasHeater: true,
  bake: { rampAirC: 68, holdObjectC: 60, holdMin: 30, rampDoneBelowK: 1.5, rampMaxMin: 45 },
  coats: [2, 4],
  idleMin: [5, 20],
  sprayMin: [4, 8],
  flashMin: [5, 10],
  finalFlashMin: [8, 15],
  coolMin: [10, 15],
  coolMaxMin: 30,
  airflowMps: { idle: 0.05, spray: 0.45, flash: 0.25, bake: 0.15, cool: 0.35 },
  boothDpPa: { idle: 1.0, spray: 6.5, flash: 4.0, bake: 3.0, cool: 5.0 },
  airAboveAmbientK: { idle: 0.5, spray: 1.5, flash: 1.0, cool: 0 },
  airTauS: { idle: 300, spray: 120, flash: 180, bake: 240, cool: 150 },
  panelTauS: 420,
  intakeFilterStartPa: [60, 95],
  exhaustFilterStartPa: [90, 140],
  intakeLoadPaPerHour: 1.2,
  exhaustLoadPaPerSprayHour: 5,
}

const PREP_DECK: BoothProfile = {
  kind: 'prep-deck',
  hasHeater: false,
  bake: undefined,
  coats: [1, 3],
  idleMin: [8, 25],
  sprayMin: [3, 6],
  flashMin: [5, 10],
  finalFlashMin: [10, 20],
  coolMin: [5, 10],
  coolMaxMin: 20,
  airflowMps: { idle: 0.03, spray: 0.3, flash: 0.18, bake: 0.18, cool: 0.25 },
  boothDpPa: { idle: 0.5, spray: 2.0, flash: 1.2, bake: 1.2, cool: 1.5 },
  airAboveAmbientK: { idle: 0.8, spray: 1.5, flash: 1.0, cool: 0 },
  airTauS: { idle: 300, spray: 150, flash: 200, bake: 200, cool: 200 },
  panelTauS: 480,
  intakeFilterStartPa: [40, 70],
  exhaustFilterStartPa: [70, 110],
  intakeLoadPaPerHour: 1.0,
  exhaustLoadPaPerSprayHour: 4,
}

export function profileFor(kind: BoothKind): BoothProfile {
  return kind === 'downdraft' ? DOWNDRAFT : PREP_DECK
}
