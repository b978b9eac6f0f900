import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'

export interface AuditEntry {
  action: string
  entity: string
  entityId?: string | number | null
  before?: unknown
  after?: unknown
}

/** Written inside the caller's transaction, so a change and its audit row land together. */
export async function audit(db: Kysely<Database> | Transaction<Database>, event: H3Event, entry: AuditEntry) {
  await db.insertInto('auditLog').values({
    actorId: event.context.auth?.user.id ?? null,
    action: entry.action,
    entity: entry.entity,
    entityId: entry.entityId == null ? null : String(entry.entityId),
    before: entry.before === undefined ? null : JSON.stringify(entry.before),
    after: entry.after === undefined ? null : JSON.stringify(entry.after),
    ip: clientAddress(event),
  }).execute()
}
