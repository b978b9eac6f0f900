import type { H3Event } from 'h3'

export type PasswordAttempt =
  | { outcome: 'throttled', retryAfterSeconds: number }
  | { outcome: 'wrong' }
  | { outcome: 'right' }

interface Account {
  id: number
  passwordHash: string | null
}

/**
 * One counted password attempt for `email` from the caller's address. The attempt is reserved
 * in the database after a hashing slot is free and before the hash, so the limits hold for
 * simultaneous attempts in every process while only attempts being hashed count as unfinished
 * (a lab signing in together behind one address is not refused for queueing). Unknown e-mails
 * and accounts without a password cost the same hash. A right password on an older hash gets
 * argon2id in its place, in the transaction that settles the attempt.
 */
export async function attemptPassword(
  event: H3Event,
  email: string,
  account: Account | undefined,
  password: string,
): Promise<PasswordAttempt> {
  const ip = clientAddress(event)
  const stored = account?.passwordHash ?? null
  const checked = await withPasswordSlot(async (hasher) => {
    const reservation = await reserveLoginAttempt(email, ip)
    if ('retryAfterSeconds' in reservation) return reservation
    const right = stored ? await hasher.verify(stored, password) : await hasher.verifyNothing(password)
    const upgrade = right && passwordNeedsRehash(stored!) ? await hasher.hash(password) : null
    return { attemptId: reservation.attemptId, right, upgrade }
  })
  if ('retryAfterSeconds' in checked) return { outcome: 'throttled', retryAfterSeconds: checked.retryAfterSeconds }

  if (!checked.upgrade || !account) {
    await settleLoginAttempt(useDb(), checked.attemptId, checked.right)
  } else {
    const upgrade = checked.upgrade
    await useDb().transaction().execute(async (trx) => {
      await settleLoginAttempt(trx, checked.attemptId, true)
      // Only if the hash is still the one just checked: a password change meanwhile wins.
      await trx.updateTable('users').set({ passwordHash: upgrade })
        .where('id', '=', account.id).where('passwordHash', '=', stored).execute()
    })
  }
  return { outcome: checked.right ? 'right' : 'wrong' }
}
