import { sql } from 'kysely'

// Kept in PostgreSQL so the limits hold across every Node process behind a load balancer.
const WINDOW_MINUTES = 15
export const ACCOUNT_FAILURE_LIMIT = 10
// A whole teaching lab can sit behind one address, so the address limit is generous.
export const ADDRESS_FAILURE_LIMIT = 100

export interface Throttled {
  retryAfterSeconds: number
}

async function retryAfter(column: 'email' | 'ip', value: string, count: number, limit: number, since: Date) {
  // The attempt that must age out of the window before one more try is allowed.
  const row = await useDb()
    .selectFrom('loginAttempts')
    .select('createdAt')
    .where(column, '=', value)
    .where('succeeded', '=', false)
    .where('createdAt', '>', since)
    .orderBy('createdAt', 'asc')
    .offset(count - limit)
    .limit(1)
    .executeTakeFirst()
  const freeAt = (row?.createdAt.getTime() ?? Date.now()) + WINDOW_MINUTES * 60_000
  return Math.max(1, Math.ceil((freeAt - Date.now()) / 1000))
}

export async function checkLoginThrottle(email: string, ip: string): Promise<Throttled | null> {
  const since = new Date(Date.now() - WINDOW_MINUTES * 60_000)
  const db = useDb()
  // Failures before the account's latest success do not count against it.
  const lastSuccess = await db
    .selectFrom('loginAttempts')
    .select((eb) => eb.fn.max('createdAt').as('at'))
    .where('email', '=', email)
    .where('succeeded', '=', true)
    .where('createdAt', '>', since)
    .executeTakeFirst()
  const accountSince = lastSuccess?.at ? new Date(lastSuccess.at as unknown as string) : since

  const counts = await db
    .selectFrom('loginAttempts')
    .select([
      sql<number>`count(*) filter (where email = ${email} and created_at > ${accountSince})`.as('byAccount'),
      sql<number>`count(*) filter (where ip = ${ip})`.as('byAddress'),
    ])
    .where('succeeded', '=', false)
    .where('createdAt', '>', since)
    .where((eb) => eb.or([eb('email', '=', email), eb('ip', '=', ip)]))
    .executeTakeFirstOrThrow()

  if (counts.byAccount >= ACCOUNT_FAILURE_LIMIT) {
    return { retryAfterSeconds: await retryAfter('email', email, counts.byAccount, ACCOUNT_FAILURE_LIMIT, accountSince) }
  }
  if (counts.byAddress >= ADDRESS_FAILURE_LIMIT) {
    return { retryAfterSeconds: await retryAfter('ip', ip, counts.byAddress, ADDRESS_FAILURE_LIMIT, since) }
  }
  return null
}

export async function recordLoginAttempt(email: string, ip: string, succeeded: boolean) {
  await useDb().insertInto('loginAttempts').values({ email, ip, succeeded }).execute()
}
