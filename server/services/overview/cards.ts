import type { H3Event } from 'h3'
import type { OverviewCard } from '#shared/types/overview'
import type { ScheduleEntry } from '#shared/types/section'
import type { SessionUser } from '#shared/types/auth'
import { HEADLINE_LABELS } from '#shared/utils/headline'
import { KEY_FACTOR_LABELS } from '#shared/types/review'
import { addDays, todayIn } from '#shared/utils/dates'
import { displayDateTime } from '#shared/utils/date-display'
import { requirePracticalAccess } from '../../utils/access'
import { useDb } from '../../utils/db'
import { reviewPracticalItems } from '../review'
import { scheduleEntries } from '../sections'
import { practicalSummary } from '../results'
import { loadForecast, stockroomToday } from '../stockroom'

// The cards of the role home pages (GET /api/overview/<role>). Reads only; the review and
// class-result cards take the request because the review scope and practical access read it.

const isoDay = (offset = 0) => addDays(todayIn('UTC'), offset)
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`

/** The review queue summed over every practical the caller reviews. */
export async function reviewCards(event: H3Event, me: SessionUser): Promise<OverviewCard[]> {
  const items = await reviewPracticalItems(event, me)
  const pending = items.reduce((n, i) => n + i.counts.pending, 0)
  const flagged = items.reduce((n, i) => n + i.counts.flagged, 0)
  const busiest = [...items].sort((a, b) => b.counts.pending - a.counts.pending)[0]
  const mostFlagged = [...items].sort((a, b) => b.counts.flagged - a.counts.flagged)[0]
  return [
    {
      title: 'Waiting for review',
      value: String(pending),
      detail: busiest && busiest.counts.pending ? `Most in ${busiest.title} (${busiest.course.code})` : 'Nothing waits for you.',
      to: busiest && busiest.counts.pending ? `/review/practicals/${busiest.id}` : '/review',
      action: 'Open the queue',
      tone: pending ? 'info' : 'ok',
    },
    {
      title: 'Flagged runs',
      value: String(flagged),
      detail: flagged ? 'Results with a problem to look at first.' : 'No result carries a flag.',
      // The queue filtered to the waiting runs that need attention, in the practical with the most.
      to: flagged && mostFlagged ? `/review/practicals/${mostFlagged.id}?status=pending&flag=any` : '/review',
      action: 'See them',
      tone: flagged ? 'warning' : 'ok',
    },
  ]
}

/** The next meeting that runs a practical, from the caller's schedule. */
export function nextLabCard(entries: ScheduleEntry[]): OverviewCard {
  const next = entries.find((e) => e.practicals.length && e.start >= new Date().toISOString())
  if (!next) {
    const detail = 'No practical is scheduled in the coming four weeks.'
    return { title: 'Next practical', value: '—', detail, to: '/schedule', action: 'Open the schedule' }
  }
  // The course's wall clock, in the product's one style ("Mon 7 Dec 2026, 08:30").
  const day = displayDateTime(next.start, next.timezone)
  return {
    title: 'Next practical',
    value: day,
    detail: `${next.practicals.map((p) => p.title).join(', ')} · ${next.courseCode} ${next.sectionCode}, ${next.room}, `
      + plural(next.enrolled, 'student'),
    to: `/practicals/${next.practicals[0]!.id}`,
    action: 'Open the practical',
  }
}

/** Shortfalls and waste for the coming four weeks, from the stockroom forecast. */
export async function stockroomCards(me: SessionUser): Promise<OverviewCard[]> {
  const today = stockroomToday()
  const forecast = await loadForecast(useDb(), me, { from: today, to: isoDay(27), today })
  const short = forecast.lines.filter((l) => l.containers > 0)
  // Items not linked to the catalog are not in the figures: say so rather than "covered".
  const notCounted = forecast.unlinkedItems.length
  const covered = notCounted
    ? `${plural(notCounted, 'item')} not counted (not linked to the catalog).`
    : 'Stock on hand covers the schedule.'
  return [
    {
      title: 'To order for the next four weeks',
      value: plural(short.reduce((n, l) => n + l.containers, 0), 'container'),
      detail: short.length ? `${short.map((l) => l.name).join(', ')}${notCounted ? `; ${covered}` : ''}` : covered,
      to: '/stockroom/forecast',
      action: 'Open the forecast',
      tone: short.length || notCounted ? 'warning' : 'ok',
    },
    {
      title: 'Halogenated waste expected',
      value: `${Math.round(forecast.halogenatedWasteMl)} mL`,
      detail: 'A planning estimate for booking pickups; segregate it from other solvent waste.',
      to: '/stockroom',
      action: 'Stockroom overview',
    },
  ]
}

export function scheduleAhead(me: SessionUser): Promise<ScheduleEntry[]> {
  return scheduleEntries(me, isoDay(0), isoDay(27))
}

/** The class-wide selectivity of the practical with the latest results the caller may see. */
export async function classResultCard(event: H3Event, me: SessionUser): Promise<OverviewCard | null> {
  const db = useDb()
  let query = db.selectFrom('submissions').innerJoin('practicals', 'practicals.id', 'submissions.practicalId')
    .select('practicals.id').orderBy('submissions.createdAt', 'desc').limit(1)
  query = me.role === 'instructor'
    ? query.where('practicals.courseId', 'in', db.selectFrom('courseOwners').select('courseId').where('userId', '=', me.id))
    : query.where('submissions.sectionId', 'in', db.selectFrom('sectionTas').select('sectionId').where('userId', '=', me.id))
  const latest = await query.executeTakeFirst()
  if (!latest) return null
  const scope = await requirePracticalAccess(event, latest.id)
  const summary = await practicalSummary(scope, {})
  const stats = summary.factors[summary.keyFactor]
  const headline = summary.headline
  if (!stats || !headline || headline.value === null || !headline.statistic) return null
  const name = KEY_FACTOR_LABELS[summary.keyFactor]
  const literature = summary.literature[summary.keyFactor]
  // The same figure the results page and the digests lead with (shared/utils/headline.ts).
  const ci = headline.ci95 ? ` (95 % CI ${headline.ci95[0].toFixed(2)} to ${headline.ci95[1].toFixed(2)})` : ''
  const median = headline.statistic === 'median' ? '' : `; median ${stats.median?.toFixed(2) ?? 'n/a'}`
  const predicted = literature ? `; the method predicts ${literature.toFixed(2)}` : ''
  const flagged = stats.test.applied && stats.outliers.length ? `; ${plural(stats.outliers.length, 'outlier')} flagged` : ''
  return {
    title: `Class ${name} selectivity`,
    value: headline.value.toFixed(2),
    detail: `${HEADLINE_LABELS[headline.statistic]} of ${plural(stats.n, 'result')} in ${scope.practical.title}`
      + `${ci}${median}${predicted}${flagged}.`,
    to: `/results/practicals/${latest.id}`,
    action: 'Open the class results',
    tone: stats.outliers.length ? 'warning' : undefined,
  }
}
