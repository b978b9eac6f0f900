import type { z } from 'zod'
import type { sectionInputSchema } from '#shared/types/section'
import type { SectionRow } from './section-rows'
import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { invalid } from '../../utils/validation'
import { conflictsFor } from './section-rows'
import { createError } from 'h3'

export type SectionInput = z.output<typeof sectionInputSchema>

/** TAs named in a section form must be TA accounts; 400 naming the field otherwise. */
export async function checkTaIds(db: Kysely<Database>, taIds: number[]) {
  if (!taIds.length) return
  const rows = await db.selectFrom('users').select('id').where('id', 'in', taIds).where('role', '=', 'ta').where('disabledAt', 'is', null)
    .execute()
  if (rows.length !== new Set(taIds).size) invalid([{ field: 'taIds', message: 'Pick teaching assistants from the list' }])
}

/** The row a save would produce, for the conflict check before anything is written. */
export function candidateRow(id: number, course: { id: number, code: string, timezone: string }, input: SectionInput,
  enrolled: number): SectionRow {
  return {
    id,
    courseId: course.id,
    courseCode: course.code,
    timezone: course.timezone,
    ...sectionValues(input),
    taIds: input.taIds,
    enrolled,
    createdAt: new Date(),
    updatedAt: new Date(),
  }
}

/** 409 with every conflict unless the instructor has seen them and confirmed. */
export async function refuseUnconfirmedConflicts(db: Kysely<Database>, candidate: SectionRow, confirmed: boolean) {
  const conflicts = await conflictsFor([candidate.id], candidate, db)
  if (conflicts.length && !confirmed) {
    throw createError({
      statusCode: 409,
      statusMessage: conflicts.length === 1 ? conflicts[0]!.message : `${conflicts.length} conflicts: ${conflicts[0]!.message}`,
      data: { conflicts },
    })
  }
  return conflicts
}

export function sectionValues(input: SectionInput) {
  return {
    code: input.code,
    weekday: input.weekday,
    startTime: input.startTime,
    endTime: input.endTime,
    room: input.room,
    hoodStations: input.hoodStations,
    studentsPerStation: input.studentsPerStation,
    firstDate: input.firstDate,
    lastDate: input.lastDate,
    skippedDates: [...new Set(input.skippedDates)].sort(),
  }
}
