import { createError } from 'h3'
import type { Kysely } from 'kysely'
import type { Database, Method, Substrate } from '../../database/schema'
import type { PracticalScope } from '../../utils/access'
import { audit, type Actor } from '../../utils/audit'
import { asBadRequest } from '../../utils/errors'
import { invalid } from '../../utils/validation'
import type { PracticalPatch, SessionsInput } from '#shared/types/practical'
import { displayDate } from '#shared/utils/date-display'
import { defaultDueAt, type ItemSpec } from '#shared/utils/procedure'
import { meetingsOf, sectionRows } from '../sections'
import { prefilledItems, replacePracticalItems, requireLibraryChoice, touchPractical } from './practical-items'

// Writes to a practical, each in one transaction with its audit row. The caller has checked that
// the actor manages the practical (requirePracticalAccess / requireCourseAccess with 'manage').

type PracticalRow = PracticalScope['practical']
type CourseRef = { id: number, timezone: string }
export type NewPractical = { title: string, substrateId: number, methodId: number, workUnit: 'student' | 'pair', notes: string }

const isReagentRole = (role: string) => role === 'halogenating-agent' || role === 'initiator'

/**
 * The scale after the practical's substrate or method changed. Another substrate takes over the
 * substrate row (its basis and amount stay); another method replaces the reagent rows with its
 * own defaults, placed after the substrate, since the old reagents no longer apply. Other rows
 * (solvent, internal standard, ...) are kept as they are.
 */
export function itemsAfterLibraryChange(items: ItemSpec[], fresh: ItemSpec[], change: { substrate: boolean, method: boolean }): ItemSpec[] {
  let next = items
  if (change.substrate) {
    const old = next.find((i) => i.role === 'substrate')
    const substrateRow = fresh.find((i) => i.role === 'substrate')!
    next = next.map((i) => (i.role === 'substrate' ? { ...substrateRow, basis: old!.basis, amount: old!.amount } : i))
  }
  if (change.method) {
    const kept = next.filter((i) => !isReagentRole(i.role))
    const at = Math.max(1, kept.findIndex((i) => i.role === 'substrate') + 1)
    next = [...kept.slice(0, at), ...fresh.filter((i) => isReagentRole(i.role)), ...kept.slice(at)]
  }
  return next
}

/** A new practical of the course, its scale prefilled from the method and the substrate; returns its id. */
export async function createPractical(db: Kysely<Database>, actor: Actor, me: { id: number }, courseId: number, input: NewPractical) {
  const { substrate, method } = await requireLibraryChoice(db, me, input)
  const items = asBadRequest(() => prefilledItems(substrate!, method!))
  return db.transaction().execute(async (trx) => {
    const row = await trx.insertInto('practicals').values({ courseId, ...input }).returning('id').executeTakeFirstOrThrow()
    await replacePracticalItems(trx, row.id, items)
    await audit(trx, actor,
      { action: 'practical.create', entity: 'practical', entityId: row.id, after: { courseId, ...input, items } })
    return row.id
  })
}

/** Changes the practical's fields; a new substrate or method rewrites the scale (itemsAfterLibraryChange). */
export async function updatePractical(db: Kysely<Database>, actor: Actor, me: { id: number }, practical: PracticalRow,
  input: PracticalPatch) {
  const id = practical.id
  const change = {
    substrate: input.substrateId !== undefined && input.substrateId !== practical.substrateId,
    method: input.methodId !== undefined && input.methodId !== practical.methodId,
  }
  const { substrate, method } = await requireLibraryChoice(db, me, {
    substrateId: change.substrate ? input.substrateId : undefined,
    methodId: change.method ? input.methodId : undefined,
  })
  const rescaled = change.substrate || change.method
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalItems').selectAll().where('practicalId', '=', id).orderBy('position').execute()
    let items: ItemSpec[] = before.map(({ id: _id, practicalId: _p, position: _pos, ...item }) => item)
    if (rescaled) {
      const newSubstrate: Substrate = substrate
        ?? await trx.selectFrom('substrates').selectAll().where('id', '=', practical.substrateId).executeTakeFirstOrThrow()
      const newMethod: Method = method
        ?? await trx.selectFrom('methods').selectAll().where('id', '=', practical.methodId).executeTakeFirstOrThrow()
      items = itemsAfterLibraryChange(items, asBadRequest(() => prefilledItems(newSubstrate, newMethod)), change)
      await replacePracticalItems(trx, id, items)
    }
    await trx.updateTable('practicals').set({ ...input, updatedAt: new Date() }).where('id', '=', id).execute()
    const { title, substrateId, methodId, workUnit, notes } = practical
    await audit(trx, actor, {
      action: 'practical.update', entity: 'practical', entityId: id,
      before: { title, substrateId, methodId, workUnit, notes, ...(rescaled ? { items: before } : {}) },
      after: { ...input, ...(rescaled ? { items } : {}) },
    })
  })
}

/**
 * Deletes the practical with its sessions and scale (ON DELETE CASCADE). Refused (409) once it
 * has released results or any upload: uploads are never lost.
 */
export async function deletePractical(db: Kysely<Database>, actor: Actor, practical: PracticalRow & Record<string, unknown>) {
  const id = practical.id
  if (practical.resultsReleasedAt) {
    throw createError({ statusCode: 409, statusMessage: 'This practical has released results; it can no longer be deleted' })
  }
  const inUse = () => createError({ statusCode: 409,
    statusMessage: 'Students have uploaded results to this practical; it can no longer be deleted' })
  const submitted = await db.selectFrom('submissions').select('id').where('practicalId', '=', id).limit(1).executeTakeFirst()
  if (submitted) throw inUse()
  await db.transaction().execute(async (trx) => {
    const sessions = await trx.selectFrom('practicalSessions').selectAll().where('practicalId', '=', id).execute()
    const items = await trx.selectFrom('practicalItems').selectAll().where('practicalId', '=', id).orderBy('position').execute()
    await trx.deleteFrom('practicals').where('id', '=', id).execute()
    await audit(trx, actor,
      { action: 'practical.delete', entity: 'practical', entityId: id, before: { ...practical, sessions, items } })
  }).catch((error) => {
    // An upload that landed after the check: the foreign key refuses the delete.
    if ((error as { code?: string }).code === '23503') throw inUse()
    throw error
  })
}

/** Replaces the per-unit scale with checked items (checkedItems), in the order given. */
export async function savePracticalItems(db: Kysely<Database>, actor: Actor, practicalId: number, items: ItemSpec[]) {
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalItems').select(['role', 'name', 'smiles', 'molarMass', 'density', 'basis', 'amount'])
      .where('practicalId', '=', practicalId).orderBy('position').execute()
    await replacePracticalItems(trx, practicalId, items)
    await touchPractical(trx, practicalId)
    await audit(trx, actor, { action: 'practical.items', entity: 'practical', entityId: practicalId, before, after: items })
  })
}

/**
 * Which sections run the practical at which meeting, and when results are due; the list replaces
 * the stored one. Each row names a section of this course and one of its meetings (skipped dates
 * are not meetings), due no earlier than the meeting's end (default: defaultDueAt).
 */
export async function setPracticalSessions(
  db: Kysely<Database>, actor: Actor, practicalId: number, course: CourseRef, sessions: SessionsInput['sessions'],
) {
  const sections = new Map((await sectionRows(db).where('sections.courseId', '=', course.id).execute()).map((row) => [row.id, row]))
  const rows = sessions.map((s, i) => {
    const section = sections.get(s.sectionId)
    if (!section) invalid([{ field: `sessions.${i}.sectionId`, message: 'Not a section of this course' }])
    const meeting = meetingsOf(section).find((m) => m.date === s.meetingDate)
    if (!meeting) {
      const message = `${displayDate(s.meetingDate)} is not a meeting of section ${section.code}`
      invalid([{ field: `sessions.${i}.meetingDate`, message }])
    }
    const dueAt = s.dueAt ? new Date(s.dueAt) : defaultDueAt(s.meetingDate, course.timezone)
    if (dueAt.getTime() < Date.parse(meeting.end)) {
      invalid([{ field: `sessions.${i}.dueAt`, message: `Due after the meeting of section ${section.code} ends` }])
    }
    return { practicalId, sectionId: s.sectionId, meetingDate: s.meetingDate, dueAt }
  })
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('practicalSessions').select(['sectionId', 'meetingDate', 'dueAt'])
      .where('practicalId', '=', practicalId).orderBy('sectionId').execute()
    await trx.deleteFrom('practicalSessions').where('practicalId', '=', practicalId).execute()
    if (rows.length) await trx.insertInto('practicalSessions').values(rows).execute()
    await touchPractical(trx, practicalId)
    await audit(trx, actor, {
      action: 'practical.sessions', entity: 'practical', entityId: practicalId,
      before, after: rows.map(({ practicalId: _p, ...r }) => r),
    })
  })
}
