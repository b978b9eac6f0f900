import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'
import { clientAddress } from './client-address'

export interface AuditEntry {
  action: string
  entity: string
  entityId?: string | number | null
  before?: unknown
  after?: unknown
}

/** Who a command acts for, as the audit log records it: the signed-in user and their address. */
export interface Actor {
  id: number | null
  ip: string
}

export function actorOf(event: H3Event): Actor {
  return { id: event.context.auth?.user.id ?? null, ip: clientAddress(event) }
}

/** Written inside the caller's transaction, so a change and its audit row land together. */
export async function recordAudit(db: Kysely<Database> | Transaction<Database>, actor: Actor, entry: AuditEntry) {
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

/** The same, for a handler that writes itself: the actor is the request's. */
export async function audit(db: Kysely<Database> | Transaction<Database>, event: H3Event, entry: AuditEntry) {
  await recordAudit(db, actorOf(event), entry)
}
