import { createHash, randomBytes } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import { escapeHtml } from '../../utils/html'
import { queueMail } from '../../utils/mail'
import { createError } from 'h3'

// Invitation links: 32 random bytes (base64url) in the e-mail, only their SHA-256 in the
// database, so reading the table yields no working link. Seven days, one use.
export const INVITATION_DAYS = 7

type Db = Kysely<Database> | Transaction<Database>

export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

export interface IssuedInvitation {
  id: number
  token: string
  expiresAt: Date
}

/** A fresh invitation; the person's older open ones stop working (they expire now). */
export async function issueInvitation(db: Db, userId: number, createdBy: number | null): Promise<IssuedInvitation> {
  const now = new Date()
  await db.updateTable('invitations').set({ expiresAt: now })
    .where('userId', '=', userId).where('usedAt', 'is', null).where('expiresAt', '>', now).execute()
  const token = randomBytes(32).toString('base64url')
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000)
  const row = await db.insertInto('invitations')
    .values({ userId, tokenHash: hashInvitationToken(token), expiresAt, createdBy })
    .returning('id').executeTakeFirstOrThrow()
  return { id: row.id, token, expiresAt }
}

export interface InvitationMail {
  invitation: IssuedInvitation
  to: { email: string, name: string }
  courseLabel: string
  courseId?: number | null
  invitedBy: string
  createdBy: number | null
  /** The product's address (runtime config public.appUrl); the link starts with it. */
  appUrl: string
}

const WHAT_YOU_SEE = 'where you will see your lab section, hood station, procedure cards and results.'

/** Plain text and HTML; names are escaped in the HTML, the link is ours. */
export async function queueInvitationMail(db: Db, mail: InvitationMail) {
  const link = `${mail.appUrl.replace(/\/$/, '')}/invite/${mail.invitation.token}`
  const until = mail.invitation.expiresAt.toUTCString().replace(/:\d\d GMT$/, ' UTC')
  const subject = `Your Halocline account for ${mail.courseLabel}`
  const text = [
    `Hello ${mail.to.name},`,
    '',
    `${mail.invitedBy} added you to ${mail.courseLabel} in Halocline, ${WHAT_YOU_SEE}`,
    '',
    'Choose your password here:',
    link,
    '',
    `The link works once and until ${until}. If it has expired, ask your instructor for a new one.`,
    '',
  ].join('\n')
  const html = [
    `<p>Hello ${escapeHtml(mail.to.name)},</p>`,
    `<p>${escapeHtml(mail.invitedBy)} added you to ${escapeHtml(mail.courseLabel)} in Halocline, ${WHAT_YOU_SEE}</p>`,
    `<p><a href="${escapeHtml(link)}">Choose your password</a></p>`,
    `<p>The link works once and until ${escapeHtml(until)}. If it has expired, ask your instructor for a new one.</p>`,
  ].join('\n')
  return queueMail(db, {
    key: `invitation:${mail.invitation.id}`,
    kind: 'invitation',
    to: [mail.to.email],
    subject,
    text,
    html,
    createdBy: mail.createdBy,
    courseId: mail.courseId ?? null,
  })
}

export type InvitationLookup =
  | { status: 'open', invitationId: number, userId: number, name: string, email: string, expiresAt: Date, disabled: boolean }
  | { status: 'used' | 'expired' | 'missing' }

export async function findInvitation(db: Db, token: string): Promise<InvitationLookup> {
  const row = await db.selectFrom('invitations').innerJoin('users', 'users.id', 'invitations.userId')
    .select(['invitations.id', 'invitations.userId', 'invitations.expiresAt', 'invitations.usedAt', 'users.name', 'users.email',
      'users.disabledAt'])
    .where('invitations.tokenHash', '=', hashInvitationToken(token)).executeTakeFirst()
  if (!row) return { status: 'missing' }
  if (row.usedAt) return { status: 'used' }
  if (row.expiresAt.getTime() <= Date.now()) return { status: 'expired' }
  return { status: 'open', invitationId: row.id, userId: row.userId, name: row.name, email: row.email, expiresAt: row.expiresAt,
    disabled: row.disabledAt !== null }
}

/** 404 for a link we never made, 410 for one that has been used or has expired. */
export function invitationGone(status: 'used' | 'expired' | 'missing'): never {
  if (status === 'missing') throw createError({ statusCode: 404, statusMessage: 'This invitation link is not known',
    data: { reason: status } })
  throw createError({
    statusCode: 410,
    statusMessage: status === 'used' ? 'This invitation has already been used' : 'This invitation has expired',
    data: { reason: status },
  })
}

export type InvitationStateRow = { passwordSet: boolean, lastExpiresAt: Date | null, lastUsedAt: Date | null }

/** accepted: a password is set; invited: an open link; expired: the latest link ran out. */
export function invitationStateOf(row: InvitationStateRow): { state: 'accepted' | 'invited' | 'expired' | 'none'
  expiresAt: string | null } {
  if (row.passwordSet) return { state: 'accepted', expiresAt: null }
  if (!row.lastExpiresAt) return { state: 'none', expiresAt: null }
  if (!row.lastUsedAt && row.lastExpiresAt.getTime() > Date.now()) return { state: 'invited', expiresAt: row.lastExpiresAt.toISOString() }
  return { state: 'expired', expiresAt: row.lastExpiresAt.toISOString() }
}
