// What a column header means, in the spellings GC software prints: abbreviations, units in
// brackets, after a slash or a comma, and the usual languages of teaching labs. Names are
// matched whole after normalising (never by substring), so "Name", "Type" or "Amount" never
// pass for a data column.

export type ColumnKind = 'rt' | 'area' | 'areaPercent' | 'height' | 'signal'
export type TimeUnit = 'min' | 's' | 'ms'

export interface HeaderName {
  kind: ColumnKind | null
  unit: string | null
}

const words = (list: string) => new Set(list.split(/\s+/).filter(Boolean))

// Compact forms: lower case, accents dropped, connectors and "peak" words removed, no spaces.
// en, de, fr, es, it, pt, nl, pl.
const RT_NAMES = words(`
  retentiontime retentiontimes rt rtime rettime ret time retention tr tret apexrt rtapex apextime
  retentionszeit retentionzeit retzeit zeit
  tempsretention temps tpsretention tpsret
  tiemporetencion tiemporet tiempo
  temporitenzione temporit tempo temporetencao
  retentietijd retentie rettijd tijd
  czasretencji czasret czas`)
const AREA_NAMES = words(`
  area areas integratedarea absarea areaabs absolutearea rawarea areacounts areasum
  flache flaeche peakflache peakflaeche
  aire surface
  oppervlakte oppervlak piekoppervlakte piekoppervlak
  polepowierzchni pole powierzchnia`)
const HEIGHT_NAMES = words(`
  height heights ht maxheight hohe hoehe peakhohe peakhoehe hauteur altura altezza hoogte piekhoogte wysokosc`)
const SIGNAL_NAMES = words(`
  signal intensity response detector fid y value abundance counts voltage current pa mv uv detectorsignal
  intensitat intensite intensidad intensita intensidade intensiteit intensywnosc
  signaal sygnal senal segnale sinal wert valeur valor valore waarde wartosc spannung tension tensao`)
/** Words that join or qualify a name without changing it ("temps de rétention", "Peak RT", "área del pico"). */
const FILLERS = words('de di du del do da der des van of the la le het dla peak peaks pic pico picco piek piku')
const PERCENT_WORDS = words('% pct percent perc prozent procent pourcent pourcentage porcentaje porcentagem percentuale porcento')
/** Qualifiers of an area % ("Rel. Area %", "Norm %"); without a percent sign they name no column. */
const RELATIVE_WORDS = words(`
  rel relative relativ relativa relativo relatief relatieve norm normalized normalised normiert normalisee
  normalizada normalizado normalizzata genormaliseerd wzgledna wzgl`)

const TIME_UNITS: Record<string, TimeUnit> = {}
for (const [unit, list] of [
  ['min', 'min mins minute minutes m minuten minuto minutos minuti minuty'],
  ['s', 's sec secs second seconds sek sekunde sekunden seg segundo segundos seconde secondes secondo secondi seconden sekunda sekundy'],
  ['ms', 'ms msec millisecond milliseconds'],
] as const) for (const w of words(list)) TIME_UNITS[w] = unit
/** Detector and area units that may trail a name without brackets ("Area mV*s", "Height pA"). */
const SIGNAL_UNITS = words('uv mv v pa na fa au mau uau counts count cts lsu')

export function timeUnitOf(unit: string | null): TimeUnit | null {
  if (!unit) return null
  return TIME_UNITS[fold(unit).trim().replace(/\.$/, '')] ?? null
}

/** Lower case without accents; µ becomes u and the centred dot a "*" ("µV·s" is "uv*s"). */
function fold(text: string): string {
  return text.toLowerCase().normalize('NFD').replace(/[\u0300-\u036f]/g, '')
    .replace(/[µμ]/g, 'u').replace(/[·⋅×]/g, '*').replace(/ß/g, 'ss').replace(/ł/g, 'l')
}

const isUnitWord = (w: string) => w in TIME_UNITS || SIGNAL_UNITS.has(w) || /[*^]/.test(w) || /^[a-z]{1,4}\*[a-z]{1,4}$/.test(w)

/** "Peak", "Pic": a word that only qualifies the name after it; alone, it heads the peak-number column. */
export function isFillerWord(text: string): boolean {
  return FILLERS.has(fold(text).replace(/[.:#]+$/, ''))
}

function compactOf(list: string[]): string {
  return list.filter((w) => !FILLERS.has(w)).join('')
}

function nameKind(compact: string): ColumnKind | null {
  if (RT_NAMES.has(compact)) return 'rt'
  if (AREA_NAMES.has(compact)) return 'area'
  if (HEIGHT_NAMES.has(compact)) return 'height'
  if (SIGNAL_NAMES.has(compact)) return 'signal'
  return null
}

const cache = new Map<string, HeaderName>()
const NOTHING: HeaderName = Object.freeze({ kind: null, unit: null }) as HeaderName

/** Classifies a header cell by meaning, tolerating units in brackets, after a slash or comma, or as a last word. */
export function classifyHeader(raw: string): HeaderName {
  // Numbers and empty cells are never names: skip the work for data rows.
  if (!/[^\d\s.,:;+\-eE"']/.test(raw)) return NOTHING
  const hit = cache.get(raw)
  if (hit) return hit
  const result = classify(raw)
  if (cache.size > 4000) cache.clear()
  cache.set(raw, result)
  return result
}

function classify(raw: string): HeaderName {
  let s = fold(raw.trim()).replace(/^"+|"+$/g, '')
  let unit: string | null = null
  s = s.replace(/[[(]([^\])]*)[\])]/g, (_, u: string) => {
    unit = unit ?? u.trim()
    return ' '
  })
  const slash = /^(.*?)\s*\/\s*(.+)$/.exec(s)
  if (slash) {
    // "Area/Height" is a ratio of two columns, not an area with a unit.
    if (isColumnName(slash[2]!)) return NOTHING
    s = slash[1]!
    unit = unit ?? slash[2]!.trim()
  }
  const comma = /^([^,]*[a-z%][^,]*),\s*(.+)$/.exec(s)
  if (comma) {
    s = comma[1]!
    unit = unit ?? comma[2]!.trim()
  }
  let list = s.replace(/%/g, ' % ').split(/[\s._\-:#]+/).filter(Boolean)
  // Trailing unit words: "Area mV*s", "RT min", "Retentionszeit Min".
  while (list.length > 1 && isUnitWord(list[list.length - 1]!) && nameKind(compactOf(list)) === null) {
    unit = unit ?? list[list.length - 1]!
    list = list.slice(0, -1)
  }
  const percent = list.some((w) => PERCENT_WORDS.has(w)) || unit === '%'
  if (percent) {
    const base = compactOf(list.filter((w) => !PERCENT_WORDS.has(w) && !RELATIVE_WORDS.has(w)))
    return base === '' || AREA_NAMES.has(base) ? { kind: 'areaPercent', unit: '%' } : { kind: null, unit }
  }
  return { kind: nameKind(compactOf(list)), unit }
}

/** True when the text names a column (used to tell "Area/Height" from "Area/µV·s"). */
export function isColumnName(text: string): boolean {
  const list = fold(text).split(/[\s._\-:#]+/).filter(Boolean)
  const compact = compactOf(list)
  const kind = nameKind(compact)
  // Signal names double as units ("pA", "mV"): "Height/µV" is a height with a unit.
  return (kind !== null && kind !== 'signal')
    || ['width', 'name', 'type', 'conc', 'amount', 'breite', 'largeur', 'anchura', 'larghezza', 'breedte', 'szerokosc'].includes(compact)
}
