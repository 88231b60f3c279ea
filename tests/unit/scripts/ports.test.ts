import { describe, expect, it } from 'vitest'
import { freePort } from '../../../scripts/lib/ports'

describe('freePort', () => {
  it('never hands the same port out twice in one process, even though nothing is bound to them yet', async () => {
    const ports: number[] = []
    for (let i = 0; i < 300; i++) ports.push(await freePort())
    expect(new Set(ports).size).toBe(ports.length)
    for (const p of ports) expect(p).toBeGreaterThan(0)
  })
})
