// The short booth inspection checklist (our own plain words). Each item is ok or not, with an optional note.
export const INSPECTION_ITEMS = [
  { key: 'lights', label: 'Lights', hint: 'All tubes work; covers clean and sealed' },
  { key: 'door_seals', label: 'Door seals', hint: 'Seals whole, doors close tight, no light at the edges' },
  { key: 'manometer', label: 'Manometer', hint: 'Filter gauges read, zeroed, tubes not kinked' },
  { key: 'fire_suppression_tag', label: 'Fire suppression tag', hint: 'Service tag in date; nozzles capped and clear' },
  { key: 'interlocks', label: 'Interlocks', hint: 'Spray gun air cuts off without airflow; no spraying in bake' },
  { key: 'drains', label: 'Drains', hint: 'Floor grates and drains clear, no standing water or paint build-up' },
] as const

export type InspectionItemKey = (typeof INSPECTION_ITEMS)[number]['key']
export const INSPECTION_KEYS: readonly InspectionItemKey[] = INSPECTION_ITEMS.map((i) => i.key)
