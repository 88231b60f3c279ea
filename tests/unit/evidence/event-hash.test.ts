import { createHash } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import { GENESIS_HASH, hashEvent } from '../../../server/domain/event-log'

const fields = {
  seq: 1,
  at: new Date('2026-12-01T10:00:00.000Z'),
  type: 'coat.finished',
  actor_id: 4,
  actor_label: 'Jun Halloway (painter)',
  subject_type: 'coat',
  subject_id: '17',
  payload: '{"coat":2}',
}

describe('hashEvent', () => {
  it('is SHA-256 over the previous hash, a newline and the canonical fields (FIPS 180-4 digest via node:crypto)', () => {
    const body = '{"actor_id":4,"actor_label":"Jun Halloway (painter)","at":"2026-12-01T10:00:00.000Z","payload":"{\\"coat\\":2}","seq":1,"subject_id":"17","subject_type":"coat","type":"coat.finished"}'
    expect(hashEvent(GENESIS_HASH, fields)).toBe(createHash('sha256').update(`${GENESIS_HASH}\n${body}`).digest('hex'))
  })
  it('changes when any field or the previous hash changes', () => {
    const h = hashEvent(GENESIS_HASH, fields)
    expect(hashEvent('1'.repeat(64), fields)).not.toBe(h)
    expect(hashEvent(GENESIS_HASH, { ...fields, payload: '{"coat":3}' })).not.toBe(h)
    expect(hashEvent(GENESIS_HASH, { ...fields, at: new Date('2026-12-01T10:00:00.001Z') })).not.toBe(h)
    expect(hashEvent(GENESIS_HASH, { ...fields, actor_id: null })).not.toBe(h)
  })
})
