import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'
import type { SessionUser } from '#shared/types/auth'
import { requireUser } from './auth'
import { clientAddress } from './client-address'

export interface AuditEntry {
  action: string
  entity: string
  entityId?: string | number | null
  before?: unknown
  after?: unknown
}

/** Who runs a command in server/services: the signed-in user and the address of the request. */
export interface Actor extends SessionUser {
  ip: string
}

/**
 * Whom an audit row names. A command usually has an Actor; a few acts have no session yet
 * (accepting an invitation, signing in), so the id may be null.
 */
export interface AuditActor {
  id: number | null
  ip: string
}

/** The acting user of a request, for a command; 401 without a session. */
export function actorOf(event: H3Event): Actor {
  return { ...requireUser(event), ip: clientAddress(event) }
}

/** Whom a request's audit row names, signed in or not (accepting an invitation has no session yet). */
export function auditActorOf(event: H3Event): AuditActor {
  return { id: event.context.auth?.user.id ?? null, ip: clientAddress(event) }
}

const isEvent = (who: H3Event | AuditActor): who is H3Event => 'context' in who && 'node' in who

/** Written inside the caller's transaction, so a change and its audit row land together. */
export async function audit(db: Kysely<Database> | Transaction<Database>, who: H3Event | AuditActor, entry: AuditEntry) {
  const actor = isEvent(who) ? auditActorOf(who) : who
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
