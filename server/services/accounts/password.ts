import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { isCommonPassword } from '../../utils/common-passwords'
import { invalid } from '../../utils/validation'

// One's own password. Checking the current one (throttled per account and address) stays with
// the route, which has the request; the rules on the new one and the write live here.

/** A password on the list of common ones is refused before the current one is even checked. */
export function refuseCommonPassword(newPassword: string) {
  if (isCommonPassword(newPassword)) {
    invalid([{ field: 'newPassword', message: 'This password is too common; choose another' }], 422)
  }
}

/**
 * Stores the new hash and moves the session version on, so every other session of the account
 * ends at its next request. Returns the new version for the caller's own session.
 */
export async function changePassword(db: Kysely<Database>, actor: Actor, passwordHash: string): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable('users')
      .set((eb) => ({ passwordHash, sessionVersion: eb('sessionVersion', '+', 1), updatedAt: new Date() }))
      .where('id', '=', actor.id)
      .returning('sessionVersion')
      .executeTakeFirstOrThrow()
    await audit(trx, actor, { action: 'password.change', entity: 'user', entityId: actor.id })
    return row.sessionVersion
  })
}
