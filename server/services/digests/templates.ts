// The section digest e-mails as small pure functions: one context in, subject, plain text,
// HTML (every value escaped) and a CSV attachment out. The preview route and the send route
// call the same function, so what the instructor previews is exactly what goes out.
import type { DigestContext, DigestUnit, DigestVersion } from './data'
import type { DigestMessage, DigestRecipient } from '#shared/types/results'
import type { FactorStats } from '#shared/types/summary'
import { RESULTS_FACTOR_LABELS, RESULTS_STATISTIC_SYMBOLS as STATISTIC_SYMBOL } from '#shared/types/results'
import { DEFAULT_OUTLIER_TEST, OUTLIER_TEST_LABELS, type OutlierTestName } from '#shared/types/course'
import { SUBMISSION_STATUS_LABELS } from '#shared/types/submission'
import { reviewFlagName } from '#shared/types/review'
import { toSafeCsv, type CsvCell } from '#shared/utils/csv-safe'
import { formatArithmeticMean, formatHeadline, HEADLINE_LABELS } from '#shared/utils/headline'
import { escapeHtml } from '../../utils/html'
import { plural, pluralWord } from '../../../utils/words'

function digestNumber(value: number | null | undefined, digits = 2): string {
  return typeof value === 'number' && Number.isFinite(value) ? value.toFixed(digits) : 'n/a'
}

/** Numbers for the CSV: rounded, but still numbers a spreadsheet can sum. */
function digestCell(value: number | null | undefined, digits = 4): CsvCell {
  return typeof value === 'number' && Number.isFinite(value) ? Number(value.toFixed(digits)) : null
}

function digestSlug(...parts: string[]): string {
  return parts.join('-').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80)
}

function digestCsvAttachment(filename: string, header: string[], rows: CsvCell[][]) {
  return { filename, contentType: 'text/csv; charset=utf-8', content: Buffer.from(toSafeCsv(header, rows), 'utf8').toString('base64') }
}

/**
 * "R = 2.943 against a critical value of 3.151 at step 2 (…)": the generalized ESD test flags
 * every value removed up to its deciding step, also one whose own R is below its λ.
 */
function outlierFigures(test: OutlierTestName, o: NonNullable<DigestUnit['outlier']>, against = 'against a critical value of'): string {
  const figures = `${STATISTIC_SYMBOL[test]} = ${digestNumber(Math.abs(o.statistic), 3)} ${against} ${digestNumber(o.critical, 3)}`
  if (test !== 'gesd' || !o.step) return figures
  const laterStep = '; a later step exceeds its critical value, so every result removed up to it is an outlier'
  return `${figures} at step ${o.step}${Math.abs(o.statistic) > o.critical ? '' : laterStep}`
}

function statusLabel(version: DigestVersion | null): string {
  return version ? SUBMISSION_STATUS_LABELS[version.status] : 'No upload yet'
}

/**
 * "geometric mean 3.12 (95 % CI 2.95 to 3.29), median 3.05, n = 31": the headline figure first
 * (shared/utils/headline.ts), as on the results page, its print view and the overview cards.
 */
function statsLine(stats: FactorStats | null): string {
  if (!stats || !stats.n) return 'no results yet'
  const lead = formatHeadline(stats.headline)
  const median = stats.headline.statistic === 'median' ? '' : `, median ${digestNumber(stats.median)}`
  return `${lead.charAt(0).toLowerCase()}${lead.slice(1)}${median}, n = ${stats.n}`
}

/** Where one value sits in the class: rank, the middle half, and against the literature. */
function placement(value: number, own: number | null, stats: FactorStats | null, literature: number | null): string[] {
  const lines: string[] = []
  const others = (stats?.values ?? []).filter((v) => v.submissionId !== own).map((v) => v.value)
  if (others.length) lines.push(`Higher than ${others.filter((v) => v < value).length} of the other ${others.length} results in the class.`)
  if (stats && stats.q1 !== null && stats.q3 !== null) {
    const range = `${digestNumber(stats.q1)} to ${digestNumber(stats.q3)}`
    const where = value < stats.q1 ? 'Below' : value > stats.q3 ? 'Above' : 'Inside'
    lines.push(`${where} the middle half of the class (${range}).`)
  }
  if (literature) {
    const off = (value / literature - 1) * 100
    lines.push(Math.abs(off) < 1
      ? 'Within 1 % of the literature value.'
      : `${Math.abs(off).toFixed(0)} % ${off > 0 ? 'above' : 'below'} the literature value.`)
  }
  return lines
}

/** "b, 1,3-dichlorobutane (CC(CCCl)Cl)": the letter, then the name, the SMILES beside it. */
const digestProduct = (p: DigestContext['products'][number]) => `${p.label}, ${p.name ? `${p.name} (${p.smiles})` : p.smiles}`

function molePercentText(ctx: DigestContext, mole: Array<{ smiles: string, percent: number | null }>): string[] {
  return ctx.products.map((p) => `${digestProduct(p)}: ${digestNumber(mole.find((m) => m.smiles === p.smiles)?.percent ?? null, 1)} %`)
}

const HTML_CELL = 'style="border:1px solid #D6D0C2;padding:4px 8px;text-align:left;vertical-align:top"'
const htmlList = (items: string[]) => (items.length ? `<ul>${items.map((i) => `<li>${escapeHtml(i)}</li>`).join('')}</ul>` : '')
const htmlTable = (header: string[], rows: string[][]) =>
  `<table style="border-collapse:collapse;font-size:14px">`
  + `<thead><tr>${header.map((h) => `<th ${HTML_CELL}>${escapeHtml(h)}</th>`).join('')}</tr></thead>`
  + `<tbody>${rows.map((r) => `<tr>${r.map((c) => `<td ${HTML_CELL}>${escapeHtml(c)}</td>`).join('')}</tr>`).join('')}</tbody></table>`
const htmlPage = (body: string) =>
  `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Halocline digest</title></head>`
  + `<body style="font-family:'IBM Plex Sans',Arial,sans-serif;color:#0B1A2B;line-height:1.45">${body}</body></html>`

/** "These figures count 12 runs; 3 of them are still waiting for review.": what the reader is looking at. */
function countedLine(ctx: DigestContext): string {
  if (!ctx.countedRuns) return 'These class figures count no runs yet.'
  const counted = `These class figures count ${plural(ctx.countedRuns, 'run')} (accepted or waiting for review)`
  const waiting = ctx.countedPending
  if (!waiting) return `${counted}; every one of them has been reviewed.`
  return `${counted}; ${waiting} of them ${pluralWord(waiting, 'is', 'are')} still waiting for review, so the figures may change.`
}

function classFigures(ctx: DigestContext): string[] {
  const label = RESULTS_FACTOR_LABELS[ctx.keyFactor]
  const lines = [
    `Class, ${label} selectivity per H: ${statsLine(ctx.classStats)}.`,
    ctx.literature === null
      ? 'Reference value: none on file for this method.'
      : `Reference value: ${digestNumber(ctx.literature)} (${ctx.literatureSource ?? ctx.methodName}).`,
    `Section ${ctx.section.code}: ${statsLine(ctx.sectionStats)}.`,
  ]
  lines.splice(1, 0, countedLine(ctx))
  const stats = ctx.classStats
  if (stats?.n) {
    lines.splice(1, 0, `${formatArithmeticMean(stats.headline)}.`, stats.headline.reason)
  }
  if (stats?.test.applied && stats.outliers.length) {
    lines.push(`${plural(stats.outliers.length, 'result')} flagged by the class's outlier test (${OUTLIER_TEST_LABELS[stats.test.name]}) `
      + 'are still counted here until a reviewer decides on them.')
  }
  if (ctx.excludedCount) {
    lines.push(`${plural(ctx.excludedCount, 'result')} left out of the class figures by a reviewer, each with a reason.`)
  }
  return lines
}

function heading(ctx: DigestContext): string {
  return `${ctx.practical.title} (${ctx.course.code}, ${ctx.course.term}): ${ctx.substrateName} with ${ctx.methodName}.`
}

/** A student's digest: the class figures and their own unit's counted result. Never anyone else's name. */
/** The student's own lines: their version, factor, where it sits in the class, flags, exclusion. */
function ownResultLines(ctx: DigestContext, unit: DigestUnit | null): string[] {
  const mine = unit?.counted ?? null
  if (!mine) {
    return ['We have no accepted or waiting-for-review result from you for this practical. '
      + 'If yours was returned, upload the corrected version.']
  }
  const test = ctx.classStats?.test.name ?? DEFAULT_OUTLIER_TEST
  const own: string[] = []
  own.push(`Version ${mine.version}, ${SUBMISSION_STATUS_LABELS[mine.status].toLowerCase()}.`)
  own.push(`${RESULTS_FACTOR_LABELS[ctx.keyFactor]} selectivity: ${digestNumber(mine.factor)}.`)
  if (mine.factor !== null) own.push(...placement(mine.factor, mine.submissionId, ctx.classStats, ctx.literature))
  own.push(`Mole %: ${molePercentText(ctx, mine.molePercents).join('; ')}.`)
  for (const f of mine.flags) own.push(`Flag: ${f.message}`)
  if (unit?.outlier) {
    own.push(`The class’s outlier test (${OUTLIER_TEST_LABELS[test]}) flags this result: ${outlierFigures(test, unit.outlier)}. `
      + 'Flagged results stay in the class figures unless a reviewer leaves them out with a reason.')
  }
  if (mine.exclusionReason !== null) {
    own.push(`This result is left out of the class figures: ${mine.exclusionReason || 'no reason given'}.`)
  }
  return own
}

/** The student's CSV: the class and section figures (headline first, the mean after the median), then their own row. */
function studentDigestCsv(ctx: DigestContext, unit: DigestUnit | null, whose: string) {
  const label = RESULTS_FACTOR_LABELS[ctx.keyFactor]
  const mine = unit?.counted ?? null
  const header = [
    'Row', 'Factor', 'n', 'Headline statistic', 'Headline', '95 % CI low', '95 % CI high', 'Median', 'Arithmetic mean', 'Literature',
    'Value', 'Version', 'Status', 'Flags', ...ctx.products.map((p) => `mol % ${digestProduct(p)}`),
  ]
  const statsRow = (name: string, s: FactorStats | null, mole: Array<number | null>): CsvCell[] => {
    const h = s?.headline
    return [name, label, s?.n ?? 0, h?.statistic ? HEADLINE_LABELS[h.statistic] : null, digestCell(h?.value),
      digestCell(h?.ci95?.[0]), digestCell(h?.ci95?.[1]), digestCell(s?.median), digestCell(s?.mean), digestCell(ctx.literature),
      null, null, null, null, ...mole.map((m) => digestCell(m))]
  }
  const flags = [
    ...(mine?.flags.map((f) => reviewFlagName(f.code)) ?? []), ...(unit?.outlier ? [reviewFlagName('outlier')] : []),
    ...(mine?.exclusionReason != null ? ['left out of the class figures'] : []),
  ]
  const rows: CsvCell[][] = [
    statsRow('Class', ctx.classStats, ctx.products.map((p) => ctx.classMolePercents.find((m) => m.smiles === p.smiles)?.percent ?? null)),
    statsRow(`Section ${ctx.section.code}`, ctx.sectionStats, ctx.products.map(() => null)),
    [whose, label, null, null, null, null, null, null, null, digestCell(ctx.literature), digestCell(mine?.factor), mine?.version ?? null,
      statusLabel(mine), flags.join('; '),
      ...ctx.products.map((p) => digestCell(mine?.molePercents.find((m) => m.smiles === p.smiles)?.percent))],
  ]
  return digestCsvAttachment(`${digestSlug(ctx.course.code, ctx.practical.title, 'your-result')}.csv`, header, rows)
}

export function studentDigestTemplate(ctx: DigestContext, recipient: DigestRecipient): DigestMessage {
  const unit = ctx.units.find((u) => u.members.some((m) => m.id === recipient.userId)) ?? null
  const atStation = ctx.practical.workUnit === 'pair' && unit?.station !== null && unit?.station !== undefined
  const whose = atStation ? 'Your station’s result' : 'Your result'
  const own = ownResultLines(ctx, unit)
  const subject = `${ctx.course.code} · ${ctx.practical.title}: class results and yours`
  const intro = `Here are the class results for ${heading(ctx)}`
  const outro = 'The attached CSV holds the class figures and your own result.'
  const text = [
    `Hello ${recipient.name},`, '', intro, '', ...classFigures(ctx), '', `${whose}:`, ...own.map((l) => `- ${l}`), '', outro, '',
    `Halocline, for ${ctx.course.code}`, '',
  ].join('\n')
  const html = htmlPage([
    `<p>Hello ${escapeHtml(recipient.name)},</p>`, `<p>${escapeHtml(intro)}</p>`,
    `<h2 style="font-size:16px">Class results</h2>`, htmlList(classFigures(ctx)),
    `<h2 style="font-size:16px">${escapeHtml(whose)}</h2>`, htmlList(own),
    `<p>${escapeHtml(outro)}</p>`, `<p style="color:#3A5671">Halocline, for ${escapeHtml(ctx.course.code)}</p>`,
  ].join(''))
  return { to: recipient.email, subject, text, html, attachments: [studentDigestCsv(ctx, unit, whose)] }
}

interface StaffRow {
  station: string
  students: string
  version: string
  status: string
  factor: string
  flags: string
  late: string
  excluded: string
}

function staffRow(ctx: DigestContext, unit: DigestUnit): StaffRow {
  const v = unit.latest
  const test = ctx.classStats?.test.name ?? DEFAULT_OUTLIER_TEST
  const outlier = unit.outlier && unit.counted?.submissionId === v?.submissionId
    ? [`outlier (${outlierFigures(test, unit.outlier, 'critical')})`]
    : []
  return {
    station: unit.station === null ? '' : String(unit.station),
    students: unit.members.map((m) => m.name).join(' & ') || unit.unitKey,
    version: v ? String(v.version) : '',
    status: statusLabel(v),
    factor: v ? digestNumber(v.factor) : '',
    flags: [...(v?.flags.map((f) => reviewFlagName(f.code)) ?? []), ...outlier].join('; '),
    late: v?.late ? 'late' : '',
    excluded: v?.exclusionReason != null ? `excluded: ${v.exclusionReason || 'no reason given'}` : '',
  }
}

/** The TAs' and instructors' digest: the whole section table with its flags, and its CSV. */
export function staffDigestTemplate(ctx: DigestContext, recipient: DigestRecipient): DigestMessage {
  const label = RESULTS_FACTOR_LABELS[ctx.keyFactor]
  const rows = ctx.units.map((u) => staffRow(ctx, u))
  const withResult = ctx.units.filter((u) => u.latest).length
  const test = ctx.classStats?.test
  const testLine = !test
    ? 'Outlier test: no results yet.'
    : test.applied
      ? `Outlier test: ${OUTLIER_TEST_LABELS[test.name]}; ${ctx.units.filter((u) => u.outlier).length} result(s) flagged in this section.`
      + (test.note ? ` ${test.note}` : '')
      : `Outlier test: ${OUTLIER_TEST_LABELS[test.name]} could not run: ${test.note ?? 'not enough results'}.`
  const subject = `${ctx.course.code} ${ctx.section.code} · ${ctx.practical.title}: section results`
  const intro = `Section ${ctx.section.code} results for ${heading(ctx)} ${withResult} of ${ctx.units.length} work units have uploaded.`
  const header = ['Station', 'Students', 'Version', 'Status', `${label} selectivity`, 'Flags', 'Late', 'Excluded']
  const cells = rows.map((r) => [r.station, r.students, r.version, r.status, r.factor, r.flags, r.late, r.excluded])
  const textRows = rows.map((r) => `- ${[
    r.station ? `Station ${r.station}` : null, r.students, r.version ? `v${r.version}` : null, r.status,
    r.factor ? `${label} ${r.factor}` : null, r.flags ? `flags: ${r.flags}` : null, r.late || null, r.excluded || null,
  ].filter(Boolean).join(' · ')}`)
  const text = [`Hello ${recipient.name},`, '', intro, '', ...classFigures(ctx), testLine, '', 'Section table:', ...textRows, '',
    'The attached CSV holds the same table with the mole % of each product.', '', `Halocline, for ${ctx.course.code}`, ''].join('\n')
  const html = htmlPage([
    `<p>Hello ${escapeHtml(recipient.name)},</p>`, `<p>${escapeHtml(intro)}</p>`,
    htmlList([...classFigures(ctx), testLine]),
    `<h2 style="font-size:16px">Section ${escapeHtml(ctx.section.code)}</h2>`, htmlTable(header, cells),
    `<p>The attached CSV holds the same table with the mole % of each product.</p>`,
    `<p style="color:#3A5671">Halocline, for ${escapeHtml(ctx.course.code)}</p>`,
  ].join(''))

  const csvHeader = [
    'Station', 'Students', 'Version', 'Status', `${label} selectivity`, ...ctx.products.map((p) => `mol % ${digestProduct(p)}`),
    'Flags', 'Late', 'Excluded', 'Exclusion reason',
  ]
  const csvRows: CsvCell[][] = ctx.units.map((u, i) => {
    const v = u.latest
    return [u.station, rows[i]!.students, v?.version ?? null, rows[i]!.status, digestCell(v?.factor),
      ...ctx.products.map((p) => digestCell(v?.molePercents.find((m) => m.smiles === p.smiles)?.percent)),
      rows[i]!.flags, v ? (v.late ? 'yes' : 'no') : null, v ? (v.exclusionReason != null ? 'yes' : 'no') : null, v?.exclusionReason ?? null]
  })
  return {
    to: recipient.email, subject, text, html,
    attachments: [
      digestCsvAttachment(`${digestSlug(ctx.course.code, ctx.section.code, ctx.practical.title, 'section')}.csv`, csvHeader, csvRows),
    ],
  }
}

export function composeDigestMessage(ctx: DigestContext, recipient: DigestRecipient): DigestMessage {
  return recipient.audience === 'student' ? studentDigestTemplate(ctx, recipient) : staffDigestTemplate(ctx, recipient)
}
