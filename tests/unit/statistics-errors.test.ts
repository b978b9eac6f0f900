import { describe, expect, it } from 'vitest'
import { statisticsFailureOf } from '../../server/utils/errors'
import { StatisticsError, summarize } from '../../shared/utils/statistics'

// The Nitro error handler turns an engine's StatisticsError into a 422 with its reason; h3 wraps
// a thrown error as the cause of its own, so the handler looks through the chain.
describe('statisticsFailureOf', () => {
  it('finds the engine error itself and inside the chain of causes', () => {
    let thrown: unknown
    try { summarize([1, Number.NaN]) } catch (error) { thrown = error }
    expect(thrown).toBeInstanceOf(StatisticsError)
    expect(statisticsFailureOf(thrown)?.message).toMatch(/Value 2 is not a finite number/)
    const wrapped = Object.assign(new Error('wrapped'), { cause: Object.assign(new Error('h3'), { cause: thrown }) })
    expect(statisticsFailureOf(wrapped)).toBe(thrown)
  })

  it('leaves every other error alone', () => {
    expect(statisticsFailureOf(new Error('other'))).toBeNull()
    expect(statisticsFailureOf(Object.assign(new Error('x'), { code: '22003' }))).toBeNull()
    expect(statisticsFailureOf(null)).toBeNull()
  })
})
