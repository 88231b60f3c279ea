import { EventEmitter } from 'node:events'
import type { AlertView } from './view'

// In-process fan-out of alert changes to the live streams (and a wake-up for the notifier). Another instance's
// changes reach this one's screens at their next refresh (summary poll / reload), not through here.

export type AlertChange = { type: 'opened' | 'cleared' | 'acknowledged' | 'resolved' | 'updated'; alert: AlertView }

const emitter = new EventEmitter()
emitter.setMaxListeners(0)

export function publishAlertChange(change: AlertChange): void {
  emitter.emit('change', change)
}

export function onAlertChange(listener: (c: AlertChange) => void): () => void {
  emitter.on('change', listener)
  return () => emitter.off('change', listener)
}
