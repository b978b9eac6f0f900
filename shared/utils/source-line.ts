// Source lines as people read them. A stored source may carry our own note that a value was
// recalled rather than looked up ("from memory"): that note belongs in tests and code comments,
// not on a student's card or in a digest. The reader sees a reference: the work and, where
// known, the edition or table; a bare recalled value reads "textbook value". Pure.

const MEMORY_NOTE = /[\s,;:(]*\b(?:recalled\s+)?from\s+memory\b\)?/gi
// "(common practice: the chlorine atom carries the chain in both)": the label is ours, the reason is the reader's.
const PRACTICE_LABEL = /\bcommon practice:\s*/gi

/** The source as a reader should see it: the reference, without our "from memory" note. */
export function readerSource(source: string | null | undefined): string {
  const text = (source ?? '').replace(MEMORY_NOTE, '').replace(PRACTICE_LABEL, '').replace(/[\s,;:]+$/, '').trim()
  if (!text) return 'textbook value'
  return text
}

/** "Chlorine and light at 25 °C: textbook value": which method a literature figure belongs to, and whence. */
export function methodReference(method: { name: string, temperatureC: number | null, source: string | null }): string {
  const at = method.temperatureC === null ? '' : ` at ${method.temperatureC} °C`
  return `${method.name}${at}: ${readerSource(method.source)}`
}
