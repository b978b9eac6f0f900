import { describe, expect, it } from 'vitest'
import { casNumberProblem, normalCasNumber } from '../../shared/utils/cas'

// CAS Registry Numbers recalled from memory (they appear in the CRC Handbook's tables and on
// suppliers' data sheets); the check-digit rule is the one CAS publishes for its numbers.
const PUBLISHED = {
  'water': '7732-18-5',
  'sodium bicarbonate': '144-55-8',
  'sulfuryl chloride': '7791-25-5',
  'chlorine': '7782-50-5',
  '1-chlorobutane': '109-69-3',
  'dichloromethane': '75-09-2',
}

describe('CAS check digit', () => {
  it.each(Object.entries(PUBLISHED))('%s %s passes', (_name, cas) => {
    expect(casNumberProblem(cas)).toBeNull()
  })

  it('water worked by hand: 8·1 + 1·2 + 2·3 + 3·4 + 7·5 + 7·6 = 105, last digit 5', () => {
    expect(8 * 1 + 1 * 2 + 2 * 3 + 3 * 4 + 7 * 5 + 7 * 6).toBe(105)
    expect(casNumberProblem('7732-18-4')).toMatch(/check digit/)
  })

  it('refuses a wrong last digit and a swap of two digits', () => {
    for (const cas of Object.values(PUBLISHED)) {
      const last = Number(cas.at(-1))
      expect(casNumberProblem(`${cas.slice(0, -1)}${(last + 1) % 10}`)).toMatch(/check digit/)
    }
    // 7791-25-5 with 2 and 5 swapped: 7791-52-5.
    expect(casNumberProblem('7791-52-5')).toMatch(/check digit/)
  })

  it('refuses other shapes, and normalises spaces or no separators', () => {
    for (const bad of ['7732185', '7-18-5', '12345678-18-5', '7732-1-5', 'CAS 7732-18-5']) expect(casNumberProblem(bad)).not.toBeNull()
    expect(normalCasNumber(' 7732 18 5 ')).toBe('7732-18-5')
    expect(normalCasNumber('7732185')).toBe('7732-18-5')
    expect(normalCasNumber('144-55-8')).toBe('144-55-8')
  })
})
