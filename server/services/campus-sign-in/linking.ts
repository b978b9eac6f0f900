import type { Kysely } from 'kysely'
import type { Database, Role } from '../../database/schema'

export interface LinkedAccount {
  id: number
  email: string
  name: string
  role: Role
  sessionVersion: number
  disabledAt: Date | null
  linkedBy: 'id claim' | 'verified e-mail'
}

const ACCOUNT_COLUMNS = ['users.id', 'users.email', 'users.name', 'users.role', 'users.sessionVersion', 'users.disabledAt'] as const

/**
 * The existing account a campus identity belongs to, or undefined: first by the configured id
 * claim against the registrar ids on active enrolments (one person across courses), then by the
 * e-mail address when the provider says it is verified. Never creates an account, and the role
 * is the account's own, never the provider's.
 */
export async function findLinkedAccount(
  db: Kysely<Database>,
  campusId: string,
  claims: Record<string, unknown>,
): Promise<LinkedAccount | undefined> {
  const byId = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(ACCOUNT_COLUMNS).distinct()
    .where('enrollments.studentId', '=', campusId).where('enrollments.status', '=', 'active')
    .execute()
  // Two accounts under one registrar id is a roster mistake: link neither rather than guess.
  if (byId.length === 1) return { ...byId[0]!, linkedBy: 'id claim' }
  if (byId.length > 1) return undefined

  const email = typeof claims.email === 'string' ? claims.email.trim().toLowerCase() : ''
  if (!email || claims.email_verified !== true) return undefined
  const byEmail = await db.selectFrom('users').select(ACCOUNT_COLUMNS).where('users.email', '=', email).executeTakeFirst()
  return byEmail && { ...byEmail, linkedBy: 'verified e-mail' }
}
