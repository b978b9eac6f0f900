// What text people type or upload may hold. It travels on into PostgreSQL (which refuses NUL
// outright), e-mails, CSV sheets and calendar feeds, so a few characters are refused everywhere,
// and line breaks are refused where one line is meant (a name, a code, a room).
// Pure: the zod field helpers (shared/types/fields.ts), the server's body and upload readers and
// the roster check all use it.

/**
 * Never in any text: C0 controls except tab, line feed and carriage return; DEL and the C1
 * controls; a lone surrogate (half of a UTF-16 pair, which no encoding can store); the Unicode
 * noncharacters (U+FFFE, U+FFFF, U+FDD0..U+FDEF and their kin in every plane).
 */
const NEVER_IN_TEXT = /(?![\t\n\r])[\p{Cc}\p{Cs}\p{Noncharacter_Code_Point}]/u
/** Also not in a one-line field: tabs and line breaks (including U+2028 and U+2029). */
const LINE_BREAKS = /[\t\n\r\u2028\u2029]/

/** "U+0000": how a message names a character without printing it. */
export function codePointLabel(char: string): string {
  return `U+${char.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}`
}

/** The first character no text may hold, or null. */
export function forbiddenCharacter(text: string): string | null {
  return NEVER_IN_TEXT.exec(text)?.[0] ?? null
}

/** The first character this text may not hold, a tab or line break too when it is one line; or null. */
export function unfitCharacter(text: string, { singleLine = false } = {}): string | null {
  return forbiddenCharacter(text) ?? (singleLine ? LINE_BREAKS.exec(text)?.[0] ?? null : null)
}

/** Why this text cannot be kept ("Remove the control character U+0000"), or null when it can. */
export function textInputProblem(text: string, { singleLine = false } = {}): string | null {
  const bad = forbiddenCharacter(text)
  if (bad) return `Remove the control character ${codePointLabel(bad)}`
  if (singleLine && LINE_BREAKS.test(text)) return 'Use one line: no tabs or line breaks'
  return null
}

/**
 * At most `max` characters of something a person sent, for quoting in a message: control
 * characters and line breaks become "?", angle brackets become ‹ › so no markup travels on, and
 * a longer text is cut with "…".
 */
export function messageExcerpt(text: string, max = 40): string {
  // Code points, not UTF-16 units, so a cut never splits a pair; a 100 kB cell is not spread whole.
  const points = Array.from(text.trim().slice(0, 4 * max))
  const shown = points.length > max ? `${points.slice(0, max - 1).join('').trimEnd()}…` : points.join('')
  return shown
    .replace(new RegExp(`${NEVER_IN_TEXT.source}|${LINE_BREAKS.source}`, 'gu'), '?')
    .replace(/</g, '\u2039').replace(/>/g, '\u203A')
}
