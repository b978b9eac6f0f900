import { describe, expect, it } from 'vitest'
import { serverTimingHeader } from '../../server/utils/server-timing'

// The header's grammar is the W3C Server Timing one: metric *( OWS ";" OWS param ), params
// `dur` (milliseconds) and `desc` (a token or quoted string), metrics separated by commas.
describe('serverTimingHeader', () => {
  it('writes each metric as name;dur with two decimals, and desc quoted', () => {
    expect(serverTimingHeader([
      { name: 'access', ms: 1.234 },
      { name: 'worker', ms: 2, description: 'the engine task alone' },
    ])).toBe('access;dur=1.23, worker;dur=2.00;desc="the engine task alone"')
  })

  it('drops quotes and backslashes from a description, and refuses a name that is not a token', () => {
    expect(serverTimingHeader([{ name: 'store', ms: 0.5, description: 'say "hi" \\ bye' }])).toBe('store;dur=0.50;desc="say hi  bye"')
    expect(() => serverTimingHeader([{ name: 'two words', ms: 1 }])).toThrow(/not a token/)
  })
})
