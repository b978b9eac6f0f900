import { createHash } from 'node:crypto'
import { type Kysely, sql } from 'kysely'
import type { Database } from '../../database/schema'

/** How long a started campus sign-in may take to come back. */
export const REQUEST_MINUTES = 10

export const hashOf = (value: string) => createHash('sha256').update(value).digest('base64url')

export interface PendingRequest {
  state: string
  nonce: string
  codeVerifier: string
  browserToken: string
  nextPath: string
}

/** Keeps what the callback must check; clears requests older than a day on the way. */
export async function saveSignInRequest(db: Kysely<Database>, request: PendingRequest) {
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('campusSignInRequests').where('createdAt', '<', sql<Date>`now() - interval '1 day'`).execute()
    await trx.insertInto('campusSignInRequests').values({
      stateHash: hashOf(request.state),
      browserHash: hashOf(request.browserToken),
      nonce: request.nonce,
      codeVerifier: request.codeVerifier,
      nextPath: request.nextPath,
    }).execute()
  })
}

export type Consumed =
  | { ok: true, nonce: string, codeVerifier: string, nextPath: string, state: string }
  | { ok: false, reason: 'wrong-state' | 'replayed-state' | 'expired-request' }

/**
 * Takes the request for `state` once: marks it used in the statement that reads it, so two
 * callbacks with the same state (a replay, a double click) cannot both go on. A state from
 * another browser (no matching cookie) is refused and used up too.
 */
export async function consumeSignInRequest(
  db: Kysely<Database>,
  state: string | null,
  browserToken: string | undefined,
): Promise<Consumed> {
  if (!state) return { ok: false, reason: 'wrong-state' }
  const taken = await db.updateTable('campusSignInRequests').set({ usedAt: sql`now()` })
    .where('stateHash', '=', hashOf(state)).where('usedAt', 'is', null)
    .returning(['nonce', 'codeVerifier', 'nextPath', 'browserHash',
      sql<boolean>`created_at < now() - make_interval(mins => ${REQUEST_MINUTES})`.as('expired')])
    .executeTakeFirst()
  if (!taken) {
    const seen = await db.selectFrom('campusSignInRequests').select('id').where('stateHash', '=', hashOf(state)).executeTakeFirst()
    return { ok: false, reason: seen ? 'replayed-state' : 'wrong-state' }
  }
  if (!browserToken || hashOf(browserToken) !== taken.browserHash) return { ok: false, reason: 'wrong-state' }
  if (taken.expired) return { ok: false, reason: 'expired-request' }
  return { ok: true, nonce: taken.nonce, codeVerifier: taken.codeVerifier, nextPath: taken.nextPath, state }
}
