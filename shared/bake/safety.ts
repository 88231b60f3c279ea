// Short safety cautions for the bake page and the booth screen's bake panel. General reminders in our own words,
// not a safety instruction: the product's data sheet and safety data sheet, the booth maker's manual and local
// codes come first.

export interface Caution {
  key: string
  /** When it applies. */
  when: 'bake' | 'spray' | 'always'
  text: string
}

export const BAKE_CAUTIONS: readonly Caution[] = [
  { key: 'no-spray-in-bake', when: 'bake', text: 'No spraying while the booth bakes: heat and solvent vapour together are a fire risk.' },
  { key: 'interlocks', when: 'always', text: 'Keep the interlocks and the ventilation working; never bypass an interlock to bake or spray.' },
  { key: 'hot-surfaces', when: 'bake', text: 'Panels, the car body and booth walls are hot during and after a bake: wear gloves and let parts cool before handling.' },
  {
    key: 'isocyanates',
    when: 'spray',
    text: 'Two-component (2K) products contain isocyanates: wear supplied-air or suitable respiratory protection while spraying and until the booth has cleared.',
  },
]

export const SAFETY_DEFERRAL =
  "These are reminders only. The product's data sheet and safety data sheet, the booth maker's instructions and local codes decide."
