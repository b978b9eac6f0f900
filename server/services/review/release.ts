import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import type { PracticalScope } from '../../utils/access'
import type { ReleaseView } from '#shared/types/review'
import { createError } from 'h3'
import { audit, type Actor } from '../../utils/audit'

/**
 * Sets or clears a practical's release (the manual policy's switch), audited. Releasing twice
 * keeps the first time; withdrawing is always allowed, so a policy change never strands a release.
 */
export async function setPracticalRelease(
  db: Kysely<Database>, actor: Actor, scope: PracticalScope, released: boolean,
): Promise<ReleaseView> {
  if (released && scope.course.releasePolicy !== 'manual') {
    throw createError({
      statusCode: 409,
      statusMessage: 'This course releases results by its policy, not by hand; choose the manual policy in the course settings first',
    })
  }
  const id = scope.practical.id
  const before = scope.practical.resultsReleasedAt
  if (Boolean(before) === released) return { practicalId: id, resultsReleasedAt: before?.toISOString() ?? null }
  const at = released ? new Date() : null
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('practicals').set({ resultsReleasedAt: at, updatedAt: new Date() }).where('id', '=', id).execute()
    await audit(trx, actor, {
      action: released ? 'practical.release' : 'practical.withdraw-release',
      entity: 'practical',
      entityId: id,
      before: { resultsReleasedAt: before?.toISOString() ?? null },
      after: { resultsReleasedAt: at?.toISOString() ?? null },
    })
  })
  return { practicalId: id, resultsReleasedAt: at?.toISOString() ?? null }
}
