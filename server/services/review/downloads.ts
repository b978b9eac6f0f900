import type { H3Event } from 'h3'
import { setResponseHeaders } from 'h3'
import { useDb } from '../../utils/db'

/**
 * A download name that is safe in any header, file system and spreadsheet: ASCII letters,
 * digits, dot, dash and underscore only, never starting with a dot or a formula character.
 */
export function reviewSafeFileName(name: string, fallback = 'download'): string {
  const ascii = name.normalize('NFKD').replace(/[\u0300-\u036f]/g, '')
  const cleaned = ascii.replace(/[^\w.-]+/g, '_').replace(/_+/g, '_').replace(/^[._-]+/, '').slice(-120)
  return cleaned || fallback
}

/** Headers for a file the browser must save, never render or sniff. */
export function setReviewDownloadHeaders(event: H3Event, fileName: string, contentType: string) {
  setResponseHeaders(event, {
    'content-type': contentType,
    'content-disposition': `attachment; filename="${fileName}"`,
    'x-content-type-options': 'nosniff',
    'cache-control': 'private, no-store',
  })
}

/** Whether a student belongs to any version of the work unit a submission is part of. */
export async function isReviewUnitMember(userId: number, submissionId: number): Promise<boolean> {
  const row = await useDb().selectFrom('submissions as s').select('s.id')
    .where('s.id', '=', submissionId)
    .where((eb) => eb.exists(eb.selectFrom('submissions as v')
      .innerJoin('submissionMembers as m', 'm.submissionId', 'v.id')
      .select('v.id')
      .whereRef('v.practicalId', '=', 's.practicalId')
      .whereRef('v.unitKey', '=', 's.unitKey')
      .where('m.userId', '=', userId)))
    .executeTakeFirst()
  return Boolean(row)
}

/** The stored original of a submission, with its version, for the download. */
export function submissionFile(submissionId: number) {
  return useDb().selectFrom('submissions').innerJoin('files', 'files.id', 'submissions.fileId')
    .select(['submissions.version', 'files.originalName', 'files.content', 'files.mediaType'])
    .where('submissions.id', '=', submissionId).executeTakeFirstOrThrow()
}
