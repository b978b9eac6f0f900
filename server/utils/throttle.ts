import { type Kysely, sql, type Transaction } from 'kysely'
import type { Database } from '../database/schema'

// Kept in PostgreSQL so the limits hold across every Node process behind a load balancer.
// An attempt counts from the moment it is reserved, before its password is checked: a burst of
// simultaneous guesses sees its own members and stops at the limit.
export interface SignInLimits {
  windowMinutes: number
  /** Failures per account; a successful sign-in clears them. */
  accountLimit: number
  /** Failures per address. A whole teaching lab can sit behind one address: keep it generous. */
  addressLimit: number
}

const DEFAULT_LIMITS: SignInLimits = { windowMinutes: 15, accountLimit: 10, addressLimit: 100 }

let limits: SignInLimits | undefined
/** From runtime config (NUXT_SIGN_IN_ACCOUNT_LIMIT and friends), read once per process. */
export function signInLimits(): SignInLimits {
  if (!limits) {
    const set = (useRuntimeConfig().signIn ?? {}) as Partial<Record<keyof SignInLimits, unknown>>
    const pick = (key: keyof SignInLimits) => {
      const n = Number(set[key])
      return Number.isInteger(n) && n > 0 ? n : DEFAULT_LIMITS[key]
    }
    limits = { windowMinutes: pick('windowMinutes'), accountLimit: pick('accountLimit'), addressLimit: pick('addressLimit') }
  }
  return limits
}

export type Reservation = { attemptId: number } | { retryAfterSeconds: number }

// Two-key advisory locks in spaces of their own (other code locks single 64-bit keys). Every
// reservation takes both in one and the same statement, so always in the same order: no two
// sign-ins can wait on each other in a circle.
const ACCOUNT_LOCK = 1
const ADDRESS_LOCK = 2

/**
 * Counts this attempt before the password is checked: under a lock per account and per address,
 * reads the failures and unfinished attempts in the window and, if both are under their limits,
 * inserts a pending attempt. Otherwise says how long until the oldest counted attempt ages out.
 */
export async function reserveLoginAttempt(email: string, ip: string): Promise<Reservation> {
  const { windowMinutes, accountLimit, addressLimit } = signInLimits()
  return useDb().transaction().execute(async (trx) => {
    await sql`select pg_advisory_xact_lock(${ACCOUNT_LOCK}, hashtext(${email})),
      pg_advisory_xact_lock(${ADDRESS_LOCK}, hashtext(${ip}))`.execute(trx)
    // A statement of its own after the locks, so its snapshot sees every reservation before ours.
    const { rows: [counts] } = await sql<{ byAccount: number, byAddress: number, accountSince: Date, attemptId: number | null }>`
      with recent as (
        select email, ip, succeeded, created_at from login_attempts
        where created_at > now() - make_interval(mins => ${windowMinutes}) and (email = ${email} or ip = ${ip})
      ), cleared as (
        select coalesce(max(created_at), now() - make_interval(mins => ${windowMinutes})) as since
        from recent where email = ${email} and succeeded
      ), counts as (
        select
          count(*) filter (where email = ${email} and succeeded is not true and created_at > cleared.since)::int as by_account,
          count(*) filter (where ip = ${ip} and succeeded is not true)::int as by_address,
          cleared.since as account_since
        from cleared left join recent on true
        group by cleared.since
      ), reserved as (
        insert into login_attempts (email, ip, succeeded)
        select ${email}, ${ip}, null from counts where by_account < ${accountLimit} and by_address < ${addressLimit}
        returning id
      )
      select counts.*, (select id from reserved) as attempt_id from counts`.execute(trx)
    const { byAccount, byAddress, accountSince, attemptId } = counts!
    if (attemptId !== null) return { attemptId }
    if (byAccount >= accountLimit) {
      return { retryAfterSeconds: await secondsUntilFree(trx, 'email', email, accountSince, byAccount - accountLimit) }
    }
    return { retryAfterSeconds: await secondsUntilFree(trx, 'ip', ip, null, byAddress - addressLimit) }
  })
}

// When the counted attempt at `offset` (oldest first) leaves the window, one more try is allowed.
async function secondsUntilFree(trx: Transaction<Database>, column: 'email' | 'ip', value: string, since: Date | null, offset: number) {
  const { windowMinutes } = signInLimits()
  const { rows: [row] } = await sql<{ seconds: number }>`
    select ceil(extract(epoch from created_at + make_interval(mins => ${windowMinutes}) - now()))::int as seconds
    from login_attempts
    where ${sql.ref(column)} = ${value} and succeeded is not true
      and created_at > greatest(now() - make_interval(mins => ${windowMinutes}), ${since ?? sql`'-infinity'::timestamptz`})
    order by created_at asc offset ${offset} limit 1`.execute(trx)
  return Math.max(1, row?.seconds ?? 1)
}

/** Marks a reserved attempt as failed or succeeded; a success clears the account's count. */
export async function settleLoginAttempt(db: Kysely<Database> | Transaction<Database>, attemptId: number, succeeded: boolean) {
  await db.updateTable('loginAttempts').set({ succeeded }).where('id', '=', attemptId).execute()
}
