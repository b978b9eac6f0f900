import { describe, expect, it } from 'vitest'
import { memoizeAsync, sizedMemo } from '../../server/engines/memo'

// The cache in front of the engine worker: answers by argument, least recently used dropped
// first, concurrent calls sharing one computation, failures never remembered.
describe('memoizeAsync', () => {
  it('computes each argument once, sharing a computation still running', async () => {
    const calls: string[] = []
    const upper = memoizeAsync(10, async (s: string) => { calls.push(s); return s.toUpperCase() })
    const [a, b] = await Promise.all([upper('ccc'), upper('ccc')])
    expect([a, b, await upper('ccc')]).toEqual(['CCC', 'CCC', 'CCC'])
    expect(calls).toEqual(['ccc'])
  })

  it('keeps the most recently used answers within its limit', async () => {
    const calls: number[] = []
    const twice = memoizeAsync(2, async (n: number) => { calls.push(n); return 2 * n })
    await twice(1)
    await twice(2)
    await twice(1) // 1 is now the most recent
    await twice(3) // drops 2
    expect(twice.has(1)).toBe(true)
    expect(twice.has(2)).toBe(false)
    await twice(2)
    expect(calls).toEqual([1, 2, 3, 2])
  })

  it('forgets a failure, so the next call tries again', async () => {
    let fail = true
    const flaky = memoizeAsync(5, async (s: string) => { if (fail) throw new Error('busy'); return s })
    await expect(flaky('CC')).rejects.toThrow('busy')
    fail = false
    await expect(flaky('CC')).resolves.toBe('CC')
  })
})

// The class summary's caches: bounded by a size the caller measures (results held), not a count.
describe('sizedMemo', () => {
  it('keeps values within the total size, least recently used out first, and never one larger than all', () => {
    const remember = sizedMemo(10)
    const calls: string[] = []
    const get = (key: string, size: number) => remember(key, size, () => { calls.push(key); return key.toUpperCase() })
    expect(get('a', 4)).toBe('A')
    expect(get('b', 4)).toBe('B')
    expect(get('a', 4)).toBe('A') // a is now the most recent
    expect(get('c', 4)).toBe('C') // 12 > 10: b goes
    expect(get('a', 4)).toBe('A')
    expect(get('b', 4)).toBe('B')
    expect(get('huge', 11)).toBe('HUGE')
    expect(get('huge', 11)).toBe('HUGE')
    expect(calls).toEqual(['a', 'b', 'c', 'b', 'huge', 'huge'])
  })

  it('forgets a promise that failed, so the next call computes again', async () => {
    const remember = sizedMemo(10)
    let fail = true
    const get = () => remember('k', 1, async () => { if (fail) throw new Error('busy'); return 'ok' })
    await expect(get()).rejects.toThrow('busy')
    fail = false
    await expect(get()).resolves.toBe('ok')
  })
})
