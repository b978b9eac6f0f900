import type { Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import type { ReviewerScope } from './scope'
import { displayDateTime } from '#shared/utils/date-display'
import { escapeHtml } from '../../utils/html'
import { queueMail } from '../../utils/mail'

// The e-mail a returned run sends: one per member of the work unit (both partners of a pair),
// keyed 'return:<review id>:<user id>' so one return never mails a person twice. It says why,
// what to do and by when, and links to the student's own results page for the practical.

export interface ReturnMail {
  reviewId: number
  submissionId: number
  version: number
  reason: string
  comment: string
  dueAt: Date
  reviewer: string
  /** The product's address (runtime config public.appUrl); the link starts with it. */
  appUrl: string
}

/** The members of a submission's work unit, with their addresses. */
function unitMembers(trx: Transaction<Database>, submissionId: number) {
  return trx.selectFrom('submissionMembers').innerJoin('users', 'users.id', 'submissionMembers.userId')
    .select(['users.id', 'users.name', 'users.email'])
    .where('submissionMembers.submissionId', '=', submissionId).where('users.disabledAt', 'is', null)
    .orderBy('users.id').execute()
}

function returnMessage(scope: ReviewerScope, mail: ReturnMail, name: string) {
  const { course, practical } = scope
  const link = `${mail.appUrl.replace(/\/$/, '')}/practicals/${practical.id}/results`
  const due = `${displayDateTime(mail.dueAt, course.timezone)} (${course.timezone})`
  const subject = `${course.code}: your run for ${practical.title} was sent back`
  const lead = `${mail.reviewer} sent back version ${mail.version} of your GC results for ${practical.title} (${course.code}).`
  const todo = `What to do: fix what the reason says and upload a new version by ${due}. Uploaded by then, it is not marked late.`
  const text = [
    `Hello ${name},`, '', lead, '', 'Reason:', mail.reason, '',
    ...(mail.comment ? ['Comment:', mail.comment, ''] : []),
    todo, '', 'Your results page:', link, '',
  ].join('\n')
  const paragraph = (s: string) => `<p>${escapeHtml(s).replace(/\n/g, '<br>')}</p>`
  const html = [
    paragraph(`Hello ${name},`), paragraph(lead),
    `<p><strong>Reason:</strong></p>`, paragraph(mail.reason),
    ...(mail.comment ? ['<p><strong>Comment:</strong></p>', paragraph(mail.comment)] : []),
    paragraph(todo),
    `<p><a href="${escapeHtml(link)}">Open your results page</a></p>`,
  ].join('\n')
  return { subject, text, html }
}

/** Queues the return's message to every member, in the caller's transaction; returns how many. */
export async function queueReturnMail(trx: Transaction<Database>, actorId: number, scope: ReviewerScope, mail: ReturnMail) {
  const members = await unitMembers(trx, mail.submissionId)
  for (const member of members) {
    const message = returnMessage(scope, mail, member.name)
    await queueMail(trx, {
      key: `return:${mail.reviewId}:${member.id}`,
      kind: 'submission-return',
      to: [member.email],
      ...message,
      createdBy: actorId,
      courseId: scope.course.id,
    })
  }
  return members.length
}
