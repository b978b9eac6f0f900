import { z } from 'zod'
import { calendarDateProblem, dateField, MAX_TERM_DAYS } from '#shared/types/fields'
import { daysBetween } from '#shared/utils/dates'
import type { ScheduleEntry } from '#shared/types/section'
import { scheduleEntries } from '~~/server/services/sections'

const querySchema = z.object({ from: dateField(), to: dateField() }).superRefine((q, ctx) => {
  if (calendarDateProblem(q.from) || calendarDateProblem(q.to)) return
  if (q.to < q.from) ctx.addIssue({ code: 'custom', path: ['to'], message: 'Must be on or after from' })
  else if (daysBetween(q.from, q.to) > MAX_TERM_DAYS) ctx.addIssue({ code: 'custom', path: ['to'],
    message: `At most ${MAX_TERM_DAYS} days after from` })
})

// Every meeting the caller may see between two dates (inclusive), with what it runs.
export default defineEventHandler(async (event): Promise<ScheduleEntry[]> => {
  const me = requireUser(event)
  const { from, to } = readQueryAs(event, querySchema)
  return scheduleEntries(me, from, to)
})
