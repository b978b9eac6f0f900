// Counts and sentences as people write them: "1 attachment", "3 sections", never "section(s)";
// one full stop at the end of a sentence, even after a name ending in "Co." or "Jr.".

// Counts are whole numbers, points may have a half: "1,204 results", "3.5 points".
const count = new Intl.NumberFormat('en', { maximumFractionDigits: 3 })

/** The noun alone for `n`: pluralWord(1, 'section') is "section", pluralWord(3, 'section') "sections". */
export function pluralWord(n: number, one: string, many = `${one}s`): string {
  return n === 1 ? one : many
}

/**
 * The count with its noun: plural(1, 'attachment') is "1 attachment", plural(3, 'section')
 * "3 sections", plural(2, 'class', 'classes') "2 classes" (irregular plurals as the third argument).
 */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${count.format(n)} ${pluralWord(n, one, many)}`
}

/** `text` ending in one full stop: nothing is added after ".", "!" or "?" ("Larkspur Supply Co."). */
export function fullStop(text: string): string {
  const trimmed = text.trimEnd()
  return /[.!?…]$/.test(trimmed) ? trimmed : `${trimmed}.`
}
