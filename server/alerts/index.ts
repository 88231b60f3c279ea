// The alerts area's entry points for the rest of the server.
//
//   setApplicationWindow(boothId, { minTempC, maxTempC, minRhPct, maxRhPct } | null)   — jobs: while a step is active
//   alertSummary(db)                    — active alerts per booth (dashboard badges; GET /api/alerts/summary)
//   onAlertChange(listener)             — live alert changes in this process
export { setApplicationWindow, alertRuntime } from './runtime'
export type { ApplicationWindowLimits } from './application-window'
export { alertSummary, type BoothAlertCounts } from './service'
export { onAlertChange, type AlertChange } from './bus'
export type { AlertView } from './view'
