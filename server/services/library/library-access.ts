import { createError, type H3Event } from 'h3'
import type { Expression, ExpressionBuilder, Kysely, SqlBool } from 'kysely'
import type { Database, Method, Substrate } from '../../database/schema'
import type { SessionUser } from '#shared/types/auth'
import { visibleCourseIds } from '../../utils/access'
import { requireRole } from '../../utils/auth'
import { useDb } from '../../utils/db'

// The substrate library and the halogenation methods. Who sees what:
//   shared entries (owner null)  every staff member reads them; nobody edits them (copy instead)
//   an instructor's own entries  they read, edit and delete them
//   entries used by a practical  readable by whoever may see that practical's course (a co-owner,
//                                the course's TAs, the coordinator for the stockroom)
// Students never list the library: their practical's page carries its substrate and windows.

export type LibraryTable = 'substrates' | 'methods'
export type LibraryMode = 'read' | 'edit'

const USED_BY_COLUMN = { substrates: 'substrateId', methods: 'methodId' } as const
const NOUN = { substrates: 'Substrate', methods: 'Method' } as const

export function requireLibraryReader(event: H3Event) {
  return requireRole(event, 'instructor', 'ta', 'coordinator')
}

/** The scope of a library query, for its where clause: shared, mine, or used in a course I see. */
type ScopeOf<T extends LibraryTable> = (eb: ExpressionBuilder<Database, T>) => Expression<SqlBool>
export function libraryScope(me: SessionUser, courseIds: number[], table: 'substrates'): ScopeOf<'substrates'>
export function libraryScope(me: SessionUser, courseIds: number[], table: 'methods'): ScopeOf<'methods'>
export function libraryScope(me: SessionUser, courseIds: number[], table: LibraryTable): ScopeOf<LibraryTable> {
  // Both tables have id and owner_id, so a builder over either names them.
  return (eb: ExpressionBuilder<Database, LibraryTable>) => eb.or([
    eb('ownerId', 'is', null),
    eb('ownerId', '=', me.id),
    ...(courseIds.length
      ? [eb('id', 'in', eb.selectFrom('practicals').select(`practicals.${USED_BY_COLUMN[table]}`)
          .where('practicals.courseId', 'in', courseIds))]
      : []),
  ])
}

/** One entry of either table, within the caller's scope. */
function libraryRow(me: SessionUser, courseIds: number[], table: LibraryTable, id: number): Promise<Substrate | Method | undefined> {
  const db = useDb()
  return table === 'substrates'
    ? db.selectFrom('substrates').selectAll().where('id', '=', id).where(libraryScope(me, courseIds, table)).executeTakeFirst()
    : db.selectFrom('methods').selectAll().where('id', '=', id).where(libraryScope(me, courseIds, table)).executeTakeFirst()
}

/**
 * Loads one library entry the caller may see (404 otherwise). 'edit' also needs the caller to
 * be the instructor who created it: shared entries are read-only for everyone (403).
 */
type EntryOf<R> = Promise<{ me: SessionUser, row: R }>
export function requireLibraryEntry(event: H3Event, table: 'substrates', id: number, mode: LibraryMode): EntryOf<Substrate>
export function requireLibraryEntry(event: H3Event, table: 'methods', id: number, mode: LibraryMode): EntryOf<Method>
export function requireLibraryEntry(event: H3Event, table: LibraryTable, id: number, mode: LibraryMode): EntryOf<Substrate | Method>
export async function requireLibraryEntry(
  event: H3Event, table: LibraryTable, id: number, mode: LibraryMode,
): EntryOf<Substrate | Method> {
  const me = requireLibraryReader(event)
  if (mode === 'edit' && me.role !== 'instructor') {
    throw createError({ statusCode: 403, statusMessage: 'Only instructors can change the library' })
  }
  const courseIds = await visibleCourseIds(me)
  const row = await libraryRow(me, courseIds, table, id)
  if (!row) throw createError({ statusCode: 404, statusMessage: `${NOUN[table]} not found` })
  if (mode === 'edit' && row.ownerId === null) {
    throw createError({ statusCode: 403, statusMessage: 'Shared library entries are read-only; make a copy to change it' })
  }
  if (mode === 'edit' && row.ownerId !== me.id) {
    throw createError({ statusCode: 403, statusMessage: 'Only the instructor who created this entry can change it' })
  }
  return { me, row }
}

/** Practicals using each entry, by id. */
export async function libraryUsage(table: LibraryTable, ids: number[], db: Kysely<Database> = useDb()): Promise<Map<number, number>> {
  if (!ids.length) return new Map()
  const column = `practicals.${USED_BY_COLUMN[table]}` as 'practicals.substrateId'
  const rows = await db.selectFrom('practicals').select((eb) => [eb.ref(column).as('entryId'), eb.fn.countAll<number>().as('n')])
    .where(column, 'in', ids).groupBy(column).execute()
  return new Map(rows.map((r) => [r.entryId, r.n]))
}

/** 409 while a practical uses the entry: its students' results depend on it. */
export async function refuseWhileInUse(table: LibraryTable, id: number, doing: string, db: Kysely<Database> = useDb()) {
  const used = (await libraryUsage(table, [id], db)).get(id) ?? 0
  if (used > 0) {
    throw createError({ statusCode: 409,
      statusMessage: `${NOUN[table]} is used by ${used} practical${used === 1 ? '' : 's'}; it cannot be ${doing}` })
  }
}

/** "2,3-dimethylbutane (copy)", kept within the name's length limit. */
export function copyName(name: string): string {
  const suffix = ' (copy)'
  return `${name.slice(0, 120 - suffix.length)}${suffix}`
}
