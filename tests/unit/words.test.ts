import { describe, expect, it } from 'vitest'
import { fullStop, plural, pluralWord } from '../../utils/words'

// English count agreement (common practice): singular for exactly one, plural otherwise,
// including zero and fractions ("0 results", "0.5 points").
describe('counts and sentences shown to people', () => {
  it('agrees the noun with the count', () => {
    expect(plural(1, 'attachment')).toBe('1 attachment')
    expect(plural(3, 'section')).toBe('3 sections')
    expect(plural(0, 'result')).toBe('0 results')
    expect(plural(0.5, 'point')).toBe('0.5 points')
    expect(plural(3.5, 'point')).toBe('3.5 points')
    expect(plural(1204, 'result')).toBe('1,204 results')
  })

  it('takes irregular plurals as a third argument', () => {
    expect(plural(2, 'class', 'classes')).toBe('2 classes')
    expect(plural(1, 'class', 'classes')).toBe('1 class')
    expect(plural(2, 'analysis', 'analyses')).toBe('2 analyses')
    expect(pluralWord(1, 'is', 'are')).toBe('is')
    expect(pluralWord(4, 'is', 'are')).toBe('are')
  })

  it('ends a sentence with one full stop, also after an abbreviation', () => {
    expect(fullStop('Requested by Ada Quill')).toBe('Requested by Ada Quill.')
    expect(fullStop('Larkspur Supply Co.')).toBe('Larkspur Supply Co.')
    expect(fullStop('Sam Ortiz Jr. ')).toBe('Sam Ortiz Jr.')
    expect(fullStop('Is it?')).toBe('Is it?')
  })
})
