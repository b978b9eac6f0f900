// From an upload's bytes to text, judging by the bytes alone. GC and spreadsheet programs on
// Windows write "Unicode text" as UTF-16 (little-endian with a byte-order mark, by default),
// older instruments Windows-1252, newer ones UTF-8 with or without a BOM. Anything else with NUL
// bytes is a binary file and is refused.

export type TextEncodingName = 'utf-8' | 'utf-16le' | 'utf-16be' | 'windows-1252'

export type DecodedText =
  | { ok: true, text: string, encoding: TextEncodingName }
  | { ok: false, reason: 'empty' | 'binary' | 'broken-utf16', message: string }

const BINARY_MESSAGE = 'this is a binary file, not a text table (CSV, TSV or TXT)'

/**
 * Controls a text table never holds (NUL and the C0 range except tab, line feed, form feed and
 * carriage return; also DEL). One of them in decoded "UTF-16" means the guess was wrong.
 */
// eslint-disable-next-line no-control-regex
const FOREIGN_CONTROLS = /[\u0000-\u0008\u000b\u000e-\u001f\u007f]/

/**
 * Bytes 0x80-0x9F of Windows-1252 (WHATWG Encoding Standard, index-windows-1252); the other
 * bytes are their own code points. Written out because Node's TextDecoder has decoded
 * 'windows-1252' as Latin-1 since 20.18.3 (nodejs/node#60888), turning "€" and typographic
 * quotes and dashes into control characters.
 */
const CP1252_HIGH = [
  0x20ac, 0x81, 0x201a, 0x192, 0x201e, 0x2026, 0x2020, 0x2021, 0x2c6, 0x2030, 0x160, 0x2039, 0x152, 0x8d, 0x17d, 0x8f,
  0x90, 0x2018, 0x2019, 0x201c, 0x201d, 0x2022, 0x2013, 0x2014, 0x2dc, 0x2122, 0x161, 0x203a, 0x153, 0x9d, 0x17e, 0x178,
]

function decodeWindows1252(bytes: Uint8Array): string {
  const parts: string[] = []
  const CHUNK = 8192
  for (let start = 0; start < bytes.length; start += CHUNK) {
    const codes = Array.from(bytes.subarray(start, start + CHUNK), (b) => (b >= 0x80 && b <= 0x9f ? CP1252_HIGH[b - 0x80]! : b))
    parts.push(String.fromCharCode(...codes))
  }
  return parts.join('')
}

function decode(bytes: Uint8Array, encoding: Exclude<TextEncodingName, 'windows-1252'>, fatal: boolean): string | null {
  try {
    return new TextDecoder(encoding, { fatal, ignoreBOM: true }).decode(bytes)
  } catch {
    return null
  }
}

/**
 * Which byte of each pair is zero. Text in UTF-16 that is mostly Latin script (digits,
 * separators, column names) has a zero high byte in nearly every pair: at odd offsets for
 * little-endian, even ones for big-endian, and almost never in the other position.
 */
function utf16Pattern(bytes: Uint8Array): 'utf-16le' | 'utf-16be' | null {
  const pairs = Math.floor(bytes.length / 2)
  if (pairs < 2) return null
  let evenZeros = 0
  let oddZeros = 0
  for (let i = 0; i + 1 < bytes.length; i += 2) {
    if (bytes[i] === 0) evenZeros++
    if (bytes[i + 1] === 0) oddZeros++
  }
  // A third of the pairs is far below what a table of numbers gives (nearly all), and far above
  // what a binary file that happens to start oddly would keep up in one position only.
  // A few zeros in the other position are characters like U+0100 or U+3000; the decoded text is
  // checked for control characters afterwards, which binary data would not pass.
  if (oddZeros >= pairs / 3 && evenZeros <= oddZeros / 20) return 'utf-16le'
  if (evenZeros >= pairs / 3 && oddZeros <= evenZeros / 20) return 'utf-16be'
  return null
}

function utf16(bytes: Uint8Array, encoding: 'utf-16le' | 'utf-16be', withBom: boolean): DecodedText {
  const body = withBom ? bytes.subarray(2) : bytes
  if (body.length % 2 === 1) {
    return {
      ok: false,
      reason: 'broken-utf16',
      message: 'this looks like UTF-16 ("Unicode") text, but the file is cut short (an odd number of bytes): export it again',
    }
  }
  const text = decode(body, encoding, true)
  if (text === null || FOREIGN_CONTROLS.test(text)) {
    if (!withBom) return { ok: false, reason: 'binary', message: BINARY_MESSAGE }
    return {
      ok: false,
      reason: 'broken-utf16',
      message: 'this file starts like UTF-16 ("Unicode") text but holds characters no text table has: export it again',
    }
  }
  return { ok: true, text, encoding }
}

/**
 * Decodes an upload as text: a BOM decides (UTF-8, UTF-16LE, UTF-16BE); without one, the
 * pattern of zero bytes tells UTF-16 apart; otherwise UTF-8 when the bytes are valid UTF-8,
 * else Windows-1252 (a superset of Latin-1's printable range, which older instruments write).
 * The BOM is never part of the text.
 */
export function decodeTextBytes(bytes: Uint8Array): DecodedText {
  if (bytes.length === 0) return { ok: false, reason: 'empty', message: 'the file is empty' }
  const [b0, b1, b2] = [bytes[0], bytes[1], bytes[2]]
  if (b0 === 0xef && b1 === 0xbb && b2 === 0xbf) {
    const rest = bytes.subarray(3)
    if (rest.includes(0)) return { ok: false, reason: 'binary', message: BINARY_MESSAGE }
    // A BOM says UTF-8; broken sequences after it become U+FFFD rather than a guess at another encoding.
    return { ok: true, text: decode(rest, 'utf-8', false) ?? '', encoding: 'utf-8' }
  }
  // FF FE 00 00 would be UTF-32LE, which no GC or spreadsheet export uses: refused below as binary.
  if (b0 === 0xff && b1 === 0xfe && !(bytes[2] === 0 && bytes[3] === 0)) return utf16(bytes, 'utf-16le', true)
  if (b0 === 0xfe && b1 === 0xff) return utf16(bytes, 'utf-16be', true)
  if (bytes.includes(0)) {
    const pattern = utf16Pattern(bytes)
    return pattern ? utf16(bytes, pattern, false) : { ok: false, reason: 'binary', message: BINARY_MESSAGE }
  }
  const utf8 = decode(bytes, 'utf-8', true)
  if (utf8 !== null) return { ok: true, text: utf8, encoding: 'utf-8' }
  return { ok: true, text: decodeWindows1252(bytes), encoding: 'windows-1252' }
}
