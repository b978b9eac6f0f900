import type { ExpressionBuilder } from 'kysely'
import type { SessionUser } from '#shared/types/auth'
import type { Database } from '../../database/schema'

/**
 * The messages a staff member may see: the ones they queued, and (for instructors) anything about
 * a course they own, whoever queued it. The outbox and the demo mailbox both read through it.
 */
export function mailVisibleTo(me: SessionUser) {
  return (eb: ExpressionBuilder<Database, 'mailMessages'>) => eb.or([
    eb('mailMessages.createdBy', '=', me.id),
    eb('mailMessages.courseId', 'in', eb.selectFrom('courseOwners').select('courseId').where('userId', '=', me.id)),
  ])
}
