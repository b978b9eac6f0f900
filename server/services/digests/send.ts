import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import type { PracticalScope } from '../../utils/access'
import type { DigestContext } from './data'
import type { DigestSent } from '#shared/types/results'
import { loadDigestContext } from './data'
import { composeDigestMessage } from './templates'
import { audit, type Actor } from '../../utils/audit'
import { queueMail } from '../../utils/mail'
import { invalid } from '../../utils/validation'

export interface DigestSendInput {
  sectionIds: number[]
  /** When to send; null sends now. */
  sendAt: Date | null
  /** The request's Idempotency-Key, if any. */
  requestKey: string | null
}

/** Every section must run the practical; a time must not be past (a minute's grace for the sender's clock). */
function checkDigestSend(scope: PracticalScope, input: DigestSendInput, now: Date) {
  const stranger = input.sectionIds.find((s) => !scope.sessionSectionIds.includes(s))
  if (stranger !== undefined) invalid([{ field: 'sectionIds', message: `Section ${stranger} does not run this practical` }])
  if (input.sendAt && input.sendAt.getTime() < now.getTime() - 60_000) {
    invalid([{ field: 'sendAt', message: 'Pick a time in the future, or send now' }])
  }
}

/**
 * One digest per section, its messages queued in the same transaction (keys
 * 'digest:<digest id>:<user id>'). The same Idempotency-Key from the same sender gives back the
 * digests it made the first time and queues nothing; without a key every call is a new send.
 */
export async function sendDigests(db: Kysely<Database>, actor: Actor, scope: PracticalScope, input: DigestSendInput): Promise<DigestSent> {
  checkDigestSend(scope, input, new Date())
  const { sendAt, requestKey } = input
  const contexts: DigestContext[] = []
  for (const id of new Set(input.sectionIds)) contexts.push(await loadDigestContext(scope, id))
  const scheduled = sendAt && sendAt.getTime() > Date.now() ? sendAt : null
  let created = false
  const digests = await db.transaction().execute(async (trx) => {
    const out: DigestSent['digests'] = []
    for (const ctx of contexts) {
      const row = await insertDigest(trx, actor, scope, ctx, requestKey, scheduled)
      if (!row) {
        out.push(sentView(ctx, await earlierDigest(trx, actor, ctx, requestKey!)))
        continue
      }
      created = true
      await queueDigestMessages(trx, actor, scope, ctx, row.id, scheduled)
      await audit(trx, actor, {
        action: 'digest.send', entity: 'digest', entityId: row.id,
        after: {
          practicalId: scope.practical.id, sectionId: ctx.section.id, recipients: ctx.recipients.length,
          scheduledAt: scheduled?.toISOString() ?? null,
        },
      })
      out.push(sentView(ctx, row))
    }
    return out
  })
  return { created, digests }
}

type Db = Kysely<Database>
type DigestRow = { id: number, scheduledAt: Date | null, recipientCount: number }

/** The digest row of one section, or undefined when this sender's key already made one for it. */
function insertDigest(trx: Db, actor: Actor, scope: PracticalScope, ctx: DigestContext, requestKey: string | null, scheduled: Date | null) {
  return trx.insertInto('digests').values({
    practicalId: scope.practical.id, sectionId: ctx.section.id, requestKey, scheduledAt: scheduled,
    status: scheduled ? 'scheduled' : 'queued', recipientCount: ctx.recipients.length, createdBy: actor.id,
  }).onConflict((oc) => oc.columns(['createdBy', 'requestKey', 'sectionId']).where('requestKey', 'is not', null).doNothing())
    .returning(['id', 'scheduledAt', 'recipientCount']).executeTakeFirst()
}

/** What the same key from the same sender made the first time for this section. */
function earlierDigest(trx: Db, actor: Actor, ctx: DigestContext, requestKey: string): Promise<DigestRow> {
  return trx.selectFrom('digests').select(['id', 'scheduledAt', 'recipientCount'])
    .where('createdBy', '=', actor.id).where('requestKey', '=', requestKey).where('sectionId', '=', ctx.section.id)
    .executeTakeFirstOrThrow()
}

/** One message per recipient, keyed 'digest:<digest id>:<user id>' so a digest never mails twice. */
async function queueDigestMessages(
  trx: Db, actor: Actor, scope: PracticalScope, ctx: DigestContext, digestId: number, scheduled: Date | null,
) {
  for (const recipient of ctx.recipients) {
    const message = composeDigestMessage(ctx, recipient)
    await queueMail(trx, {
      key: `digest:${digestId}:${recipient.userId}`,
      kind: `digest-${recipient.audience}`,
      to: [message.to], subject: message.subject, text: message.text, html: message.html, attachments: message.attachments,
      createdBy: actor.id, courseId: scope.course.id, sendAt: scheduled ?? undefined,
    })
  }
}

function sentView(ctx: DigestContext, row: DigestRow): DigestSent['digests'][number] {
  return {
    id: row.id, sectionId: ctx.section.id, sectionCode: ctx.section.code,
    scheduledAt: row.scheduledAt?.toISOString() ?? null, recipientCount: row.recipientCount,
  }
}
