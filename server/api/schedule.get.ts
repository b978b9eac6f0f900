import { z } from 'zod'
import type { ScheduleEntry } from '#shared/types/section'

const date = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use YYYY-MM-DD')
  .refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), 'Not a calendar date')
const querySchema = z.object({ from: date, to: date }).refine((q) => q.to >= q.from, { message: 'to: on or after from', path: ['to'] })

// Every meeting the caller may see between two dates (inclusive), with what it runs.
export default defineEventHandler(async (event): Promise<ScheduleEntry[]> => {
  const me = requireUser(event)
  const { from, to } = readQueryAs(event, querySchema)
  return scheduleEntries(me, from, to)
})
