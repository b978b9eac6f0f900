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

/** Who runs a command: the signed-in user, and the address their audit rows record. */
export interface Actor {
  user: SessionUser
  ip: string
}

/** The acting user of a request, for commands that take an Actor instead of the event. */
export function actorOf(event: H3Event): Actor {
  return { user: requireUser(event), ip: clientAddress(event) }
}

const isActor = (who: H3Event | Actor): who is Actor => 'user' in who && 'ip' in who

/** Written inside the caller's transaction, so a change and its audit row land together. */
export async function audit(db: Kysely<Database> | Transaction<Database>, who: H3Event | Actor, entry: AuditEntry) {
  const actor = isActor(who) ? who : { user: who.context.auth?.user ?? null, ip: clientAddress(who) }
  await db.insertInto('auditLog').values({
    actorId: actor.user?.id ?? null,
    action: entry.action,
    entity: entry.entity,
    entityId: entry.entityId == null ? null : String(entry.entityId),
    before: entry.before === undefined ? null : JSON.stringify(entry.before),
    after: entry.after === undefined ? null : JSON.stringify(entry.after),
    ip: actor.ip,
  }).execute()
}
