import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'
import type { SessionUser } from '#shared/types/auth'

export interface AuditEntry {
  action: string
  entity: string
  entityId?: string | number | null
  before?: unknown
  after?: unknown
}

/** Who acts, as a command in server/services sees it: the signed-in user and the request's address. */
export interface Actor extends SessionUser {
  ip: string
}

/** The acting user of a request, for a command; 401 without a session. */
export function actorOf(event: H3Event): Actor {
  return { ...requireUser(event), ip: clientAddress(event) }
}

/** Written inside the caller's transaction, so a change and its audit row land together. */
export async function audit(db: Kysely<Database> | Transaction<Database>, event: H3Event, entry: AuditEntry) {
  await auditAs(db, { id: event.context.auth?.user.id ?? null, ip: clientAddress(event) }, entry)
}

/** `audit` for a command, which knows its actor rather than the request. */
export async function auditAs(db: Kysely<Database> | Transaction<Database>, actor: { id: number | null, ip: string }, entry: AuditEntry) {
  await db.insertInto('auditLog').values({
    actorId: actor.id,
    action: entry.action,
    entity: entry.entity,
    entityId: entry.entityId == null ? null : String(entry.entityId),
    before: entry.before === undefined ? null : JSON.stringify(entry.before),
    after: entry.after === undefined ? null : JSON.stringify(entry.after),
    ip: actor.ip,
  }).execute()
}
