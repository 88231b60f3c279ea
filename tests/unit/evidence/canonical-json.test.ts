import { describe, expect, it } from 'vitest'
import { canonicalJson } from '../../../server/domain/canonical-json'

describe('canonicalJson', () => {
  it('sorts keys at every depth and drops whitespace', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: 'x' } })).toBe('{"a":{"c":"x","d":[3,{"y":2,"z":1}]},"b":1}')
  })
  it('gives the same bytes whatever the key order', () => {
    expect(canonicalJson({ x: 1, y: 2 })).toBe(canonicalJson({ y: 2, x: 1 }))
  })
  it('writes dates as ISO strings, drops undefined and turns non-finite numbers into null', () => {
    expect(canonicalJson({ at: new Date(Date.UTC(2026, 0, 2)), gone: undefined, n: Number.NaN, l: [undefined] })).toBe(
      '{"at":"2026-01-02T00:00:00.000Z","l":[null],"n":null}',
    )
  })
  it('escapes strings as JSON does', () => {
    expect(canonicalJson({ s: 'a"b\n' })).toBe('{"s":"a\\"b\\n"}')
  })
})
