// Start-up state that routes and /api/health consult. Set by the server plugins.
export interface ComponentState {
  up: boolean
  detail?: string
  since: number
}

const states = new Map<string, ComponentState>()
let dbReady: Promise<void> = new Promise(() => undefined)

export function setComponentState(name: string, up: boolean, detail?: string): void {
  const prev = states.get(name)
  if (prev && prev.up === up && prev.detail === detail) return
  states.set(name, { up, detail, since: Date.now() })
}

export function componentStates(): Record<string, ComponentState> {
  return Object.fromEntries(states)
}

export function setDatabaseReady(p: Promise<void>): void {
  dbReady = p
}

/** Resolves once migrations (and the demo seed, when asked for) have run. */
export function databaseReady(): Promise<void> {
  return dbReady
}
