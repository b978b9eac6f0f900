import { describe, expect, it } from 'vitest'
import { codePointLabel, messageExcerpt, textInputProblem, unfitCharacter } from '../../shared/utils/text-input'
import { blockText, calendarDateProblem, dateField, instantField, lineText, recordIdList } from '../../shared/types/fields'
import { errorMessageText, statusLineText } from '../../server/utils/status-line'

// The character rule for text input and the pieces schemas are built from. Character names and
// categories are Unicode's (General_Category Cc and Cs, Noncharacter_Code_Point).

describe('which characters text may hold', () => {
  it('refuses C0 controls but tab, LF and CR; DEL; C1; lone surrogates; noncharacters', () => {
    for (const char of ['\u0000', '\u0001', '\u001F', '\u007F', '\u0080', '\u0085', '\u009F', '\uD800', '\uDFFF', '\uFFFE', '\uFFFF', '\uFDD0', '\u{1FFFE}', '\u{10FFFF}']) {
      expect(textInputProblem(`a${char}b`), codePointLabel(char)).toBe(`Remove the control character ${codePointLabel(char)}`)
    }
  })

  it('keeps tabs and line breaks in several lines, letters of every script, emoji as a whole pair', () => {
    for (const text of ['line one\n\tline two\r\n', 'Łódź – Ångström 1,2-dichloro… 2°:1°', '日本語', 'emoji \u{1F9EA} ok', '\u00A0no-break']) {
      expect(textInputProblem(text), text).toBeNull()
    }
  })

  it('a one-line field refuses tabs and line breaks, U+2028 included', () => {
    for (const br of ['\n', '\r', '\t', '\u2028', '\u2029']) expect(textInputProblem(`a${br}b`, { singleLine: true })).toBe('Use one line: no tabs or line breaks')
    expect(unfitCharacter('a\nb', { singleLine: true })).toBe('\n')
    expect(unfitCharacter('a\nb')).toBeNull()
  })

  it('labels code points beyond the BMP by their whole value', () => {
    expect(codePointLabel('\u{1FFFF}')).toBe('U+1FFFF')
    expect(codePointLabel('\u0000')).toBe('U+0000')
  })
})

describe('quoting input in a message', () => {
  it('keeps at most 40 characters with an ellipsis, and never splits a surrogate pair', () => {
    expect(messageExcerpt('x'.repeat(100_000))).toBe(`${'x'.repeat(39)}…`)
    const emoji = '\u{1F9EA}'.repeat(50)
    const cut = messageExcerpt(emoji)
    expect([...cut]).toHaveLength(40)
    expect(cut.isWellFormed()).toBe(true)
    expect(messageExcerpt('  12.5  ')).toBe('12.5')
  })

  it('turns markup brackets and controls into harmless characters', () => {
    expect(messageExcerpt('<img src=x onerror=alert(1)>')).toBe('‹img src=x onerror=alert(1)›')
    expect(messageExcerpt('a\u0000b\nc')).toBe('a?b?c')
  })
})

describe('schema pieces', () => {
  it('one line and several lines', () => {
    expect(lineText(10, 'Enter it').safeParse('  ').error?.issues.map((i) => i.message)).toEqual(['Enter it'])
    expect(lineText(3).safeParse('abcd').error?.issues.map((i) => i.message)).toEqual(['Use at most 3 characters'])
    expect(lineText(20).safeParse('a\u0000b').error?.issues.map((i) => i.message)).toEqual(['Remove the control character U+0000'])
    expect(blockText(20).parse(' a\nb ')).toBe('a\nb')
  })

  it('dates between 2000-01-01 and 2100-12-31, real calendar days, one message each', () => {
    expect(calendarDateProblem('2027-02-28')).toBeNull()
    expect(calendarDateProblem('2028-02-29')).toBeNull()
    expect(calendarDateProblem('2027-02-29')).toBe('Not a calendar date')
    expect(calendarDateProblem('1000-01-01')).toBe('Use a date from 2000-01-01 to 2100-12-31')
    expect(calendarDateProblem('2101-01-01')).toBe('Use a date from 2000-01-01 to 2100-12-31')
    expect(calendarDateProblem('27-1-1')).toBe('Use YYYY-MM-DD')
    expect(dateField().safeParse('9999-12-31').error?.issues).toHaveLength(1)
    expect(instantField().safeParse('2027-01-01T10:00:00+01:00').success).toBe(true)
    expect(instantField().safeParse('9999-12-31T00:00:00Z').error?.issues.map((i) => i.message)).toEqual(['Use a date from 2000-01-01 to 2100-12-31'])
  })

  it('id lists: at least one, at most the cap, each a PostgreSQL integer', () => {
    const list = recordIdList(200, 'section')
    expect(list.safeParse([]).error?.issues.map((i) => i.message)).toEqual(['Pick at least one section'])
    expect(list.safeParse(Array.from({ length: 201 }, (_, i) => i + 1)).error?.issues.map((i) => i.message)).toEqual(['At most 200 sections'])
    expect(list.safeParse([2 ** 31]).error?.issues.map((i) => i.message)).toEqual(['Pick a section from the list'])
    expect(list.parse([1, 2 ** 31 - 1])).toEqual([1, 2 ** 31 - 1])
  })
})

describe('the words of an error', () => {
  it('the status line is printable ASCII of at most 200 characters', () => {
    expect(statusLineText('temperatureC: At most 400 °C')).toBe('temperatureC: At most 400 degC')
    expect(statusLineText('Say where it comes from (“from memory”) – 2°:1° ≥ 1 µL…')).toBe('Say where it comes from ("from memory") - 2 deg:1 deg >= 1 uL...')
    expect(statusLineText('naïve Łódź')).toBe('naive ?odz')
    const long = statusLineText(`file: Row 4: ${'9'.repeat(1_900_000)}`)
    expect(long.length).toBe(200)
    expect(long.endsWith('...')).toBe(true)
    expect(statusLineText('a\u0000b\r\nc')).toBe('a b c')
  })

  it('the JSON sentence keeps its characters and stops at 500', () => {
    expect(errorMessageText('At most 400 °C')).toBe('At most 400 °C')
    const long = errorMessageText('x'.repeat(10_000))
    expect(long).toHaveLength(500)
    expect(long.endsWith('…')).toBe(true)
  })
})

describe('PostgreSQL refusing text', () => {
  it('22021 and 22P05, also as the cause of another error, are bad requests', async () => {
    const { isUnstorableText } = await import('../../server/utils/errors')
    expect(isUnstorableText({ code: '22021' })).toBe(true)
    expect(isUnstorableText(new Error('wrapped', { cause: { code: '22P05' } }))).toBe(true)
    expect(isUnstorableText({ code: '23505' })).toBe(false)
  })
})
