import type { H3Event } from 'h3'
import type { Role, SessionUser } from '#shared/types/auth'

declare module 'h3' {
  interface H3EventContext {
    /** Set once per request by server/middleware/session.ts after the version check. */
    auth?: { user: SessionUser } | null
  }
}

export function requireUser(event: H3Event): SessionUser {
  const user = event.context.auth?.user
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Sign in to continue' })
  return user
}

export function requireRole<R extends Role>(event: H3Event, ...roles: R[]): SessionUser & { role: R } {
  const user = requireUser(event)
  if (!roles.includes(user.role as R)) {
    throw createError({ statusCode: 403, statusMessage: 'Your role does not have access to this' })
  }
  return user as SessionUser & { role: R }
}

/** Ends every session of this account, on every process, at its next request. */
export async function revokeSessions(userId: number): Promise<number> {
  const row = await useDb()
    .updateTable('users')
    .set((eb) => ({ sessionVersion: eb('sessionVersion', '+', 1), updatedAt: new Date() }))
    .where('id', '=', userId)
    .returning('sessionVersion')
    .executeTakeFirst()
  await announceAccountChange(useDb(), userId)
  return row?.sessionVersion ?? 0
}
