// A booth's watches as managers edit them: each rule (validated with WatchRuleSchema) plus the extra people its
// e-mails go to. Stored as JSON in watch_sets; a booth without a row uses the shop defaults.

import { z } from 'zod'
import { defaultWatchRules, WatchRuleSchema, type WatchDefaultsKind, type WatchRule } from '#shared/watch'
import type { StoredWatch } from '../db/tables/alerts'
import { APPLICATION_WINDOW_RULES } from './application-window'

export interface BoothWatch {
  rule: WatchRule
  recipients: string[]
}

export const MAX_WATCHES = 50
export const MAX_RECIPIENTS = 20
const RESERVED_PREFIX = 'application-window'

export const RecipientsSchema = z
  .array(z.email({ error: 'Enter a valid e-mail address' }).trim().toLowerCase(), { error: 'recipients is a list of e-mail addresses' })
  .max(MAX_RECIPIENTS, `At most ${MAX_RECIPIENTS} extra recipients per watch`)
  .default([])

/** One watch as the API takes and gives it: the rule's fields plus `recipients`. */
export const WatchEntrySchema = z.intersection(WatchRuleSchema, z.object({ recipients: RecipientsSchema }))

export const WatchListSchema = z
  .array(WatchEntrySchema, { error: 'watches is a list of watch rules' })
  .max(MAX_WATCHES, `At most ${MAX_WATCHES} watches per booth`)
  .superRefine((list, ctx) => {
    const seen = new Set<string>()
    list.forEach((w, i) => {
      if (seen.has(w.id)) ctx.addIssue({ code: 'custom', path: [i, 'id'], message: `Rule id "${w.id}" is used twice` })
      if (w.id.startsWith(RESERVED_PREFIX)) {
        ctx.addIssue({ code: 'custom', path: [i, 'id'], message: `Ids starting with "${RESERVED_PREFIX}" are kept for the job's application window` })
      }
      seen.add(w.id)
    })
  })

export const PutWatchesSchema = z.object({ watches: WatchListSchema })

export type WatchEntry = z.output<typeof WatchEntrySchema>

export function fromEntries(entries: readonly WatchEntry[]): BoothWatch[] {
  return entries.map(({ recipients, ...rule }) => ({ rule: rule as WatchRule, recipients: [...new Set(recipients)] }))
}

export function toEntries(watches: readonly BoothWatch[]): (WatchRule & { recipients: string[] })[] {
  return watches.map((w) => ({ ...w.rule, recipients: w.recipients }))
}

export function toStored(watches: readonly BoothWatch[]): StoredWatch[] {
  return watches.map((w) => ({ rule: w.rule, recipients: w.recipients }))
}

/** Stored JSON back to watches; a rule that no longer validates (schema changed) is skipped, not fatal. */
export function fromStored(stored: unknown): { watches: BoothWatch[]; skipped: number } {
  const list = Array.isArray(stored) ? stored : []
  const watches: BoothWatch[] = []
  let skipped = 0
  for (const item of list) {
    const o = typeof item === 'object' && item !== null ? (item as Record<string, unknown>) : {}
    const rule = WatchRuleSchema.safeParse(o.rule)
    const recipients = RecipientsSchema.safeParse(o.recipients ?? [])
    if (rule.success && recipients.success) watches.push({ rule: rule.data, recipients: recipients.data })
    else skipped++
  }
  return { watches, skipped }
}

export function defaultWatches(boothKind?: WatchDefaultsKind): BoothWatch[] {
  return defaultWatchRules(boothKind).map((rule) => ({ rule, recipients: [] }))
}

/** Reserved rule ids of the application window (not editable as watches). */
export const APPLICATION_WINDOW_RULE_IDS: readonly string[] = Object.values(APPLICATION_WINDOW_RULES)
