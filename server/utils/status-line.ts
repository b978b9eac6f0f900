// What an error may say, and where. The HTTP reason phrase travels in the status line, which
// clients and proxies cap (a 1.9 MB line is refused outright) and which holds only printable
// ASCII: it gets a short, transliterated copy. The JSON body keeps the human sentence, capped.

/** The reason phrase: printable ASCII, at most this long. */
export const MAX_STATUS_LINE = 200
/** The sentence in the JSON body (`statusMessage`, `message`). */
export const MAX_ERROR_MESSAGE = 500

// Our own sentences use a few typographic characters; each gets its plain spelling.
const ASCII_SPELLING: Record<string, string> = {
  '\u2018': '\'', '\u2019': '\'', '\u201A': '\'', '\u2032': '\'', '\u201C': '"', '\u201D': '"', '\u201E': '"', '\u2033': '"',
  '\u2039': '\'', '\u203A': '\'', '\u00AB': '"', '\u00BB': '"',
  '\u2013': '-', '\u2014': '-', '\u2012': '-', '\u2212': '-', '\u2010': '-', '\u2011': '-',
  '\u2026': '...', '\u00B0': ' deg', '\u00D7': 'x', '\u00B7': '.', '\u2022': '*', '\u00B5': 'u', '\u03BC': 'u',
  '\u2264': '<=', '\u2265': '>=', '\u2260': '!=', '\u00B1': '+/-', '\u2192': '->', '\u2190': '<-', '\u00BD': '1/2',
  '\u00A0': ' ', '\u202F': ' ', '\u2009': ' ', '\u2002': ' ', '\u2003': ' ', '\u00AD': '',
  '\u00B2': '2', '\u00B3': '3', '\u00B9': '1', '\u2070': '0', '\u00C5': 'A', '\u212B': 'A', '\u00DF': 'ss', '\u00E6': 'ae', '\u00C6': 'AE', '\u0153': 'oe', '\u00F8': 'o', '\u00D8': 'O',
}

/** Cuts a text to `max` characters (code points) with "…", never inside a surrogate pair. */
function capped(text: string, max: number, ellipsis: string): string {
  const points = Array.from(text.slice(0, 4 * max))
  return points.length > max ? `${points.slice(0, max - ellipsis.length).join('').trimEnd()}${ellipsis}` : points.join('')
}

/** The JSON body's sentence: controls and line breaks become spaces, at most 500 characters. */
export function errorMessageText(text: string): string {
  // eslint-disable-next-line no-control-regex -- the point is to find control characters
  return capped(text.replace(/[\u0000-\u001F\u007F-\u009F\u2028\u2029]+/g, ' ').trim(), MAX_ERROR_MESSAGE, '\u2026')
}

/** The reason phrase: typographic characters spelled in ASCII, accents dropped, the rest "?", at most 200. */
export function statusLineText(text: string): string {
  const ascii = errorMessageText(text).replace(/[^\x20-\x7E]/gu, (char) => ASCII_SPELLING[char] ?? char)
    .normalize('NFKD').replace(/[\u0300-\u036F]/g, '').replace(/[^\x20-\x7E]/gu, '?')
  return capped(ascii.replace(/ {2,}/g, ' ').trim(), MAX_STATUS_LINE, '...')
}
