import { describe, expect, it } from 'vitest'
import { methodReference, readerSource } from '../../shared/utils/source-line'

// What a student reads as a source: a reference, never our own "from memory" note.
describe('readerSource', () => {
  it('drops the note and keeps the reference', () => {
    expect(readerSource('CRC Handbook of Chemistry and Physics, from memory')).toBe('CRC Handbook of Chemistry and Physics')
    expect(readerSource('Brown and Ash (1955); rounded, from memory')).toBe('Brown and Ash (1955); rounded')
    expect(readerSource('textbook value, from memory')).toBe('textbook value')
    expect(readerSource('Table 4 (recalled from memory)')).toBe('Table 4')
  })

  it('keeps a reason but not our "common practice" label', () => {
    expect(readerSource('derived from the chlorine-and-light values scaled to 80 °C (common practice: the chlorine atom carries the chain in both)'))
      .toBe('derived from the chlorine-and-light values scaled to 80 °C (the chlorine atom carries the chain in both)')
  })

  it('a bare note or nothing reads "textbook value"', () => {
    expect(readerSource('From memory')).toBe('textbook value')
    expect(readerSource('')).toBe('textbook value')
    expect(readerSource(null)).toBe('textbook value')
  })

  it('names the method and temperature before the reference', () => {
    expect(methodReference({ name: 'Bromine and light', temperatureC: 125, source: 'textbook value, from memory' }))
      .toBe('Bromine and light at 125 °C: textbook value')
  })
})
