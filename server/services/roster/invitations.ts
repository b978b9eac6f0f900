import { createHash, randomBytes } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../../database/schema'
import { escapeHtml } from '../../utils/html'
import { queueMail } from '../../utils/mail'
import { createError } from 'h3'
import { addDays, zonedInstant } from '#shared/utils/dates'
import { displayDateTime } from '#shared/utils/date-display'

// Invitation links: 32 random bytes (base64url) in the e-mail, only their SHA-256 in the
// database, so reading the table yields no working link. One use; they last into the term
// (invitationExpiry), not a fixed week from the import, since rosters are loaded weeks ahead.
export const INVITATION_DAYS = 14

type Db = Kysely<Database> | Transaction<Database>

export function hashInvitationToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

export interface IssuedInvitation {
  id: number
  token: string
  expiresAt: Date
}

/** The course an invitation is for: its name in the mail, its term's start for the expiry. */
export interface InvitingCourse { id: number, code: string, title: string, term: string, timezone: string }

/**
 * The end of the 14th day after the course's first section meeting (midnight in the course's
 * zone), or 14 days after now when that is later: a roster loaded in summer still works in week two.
 */
export async function invitationExpiry(db: Db, course: Pick<InvitingCourse, 'id' | 'timezone'>, now = new Date()): Promise<Date> {
  const fromNow = new Date(now.getTime() + INVITATION_DAYS * 86_400_000)
  const first = await db.selectFrom('sections').select((eb) => eb.fn.min('firstDate').as('start'))
    .where('courseId', '=', course.id).executeTakeFirst()
  if (!first?.start) return fromNow
  // DATE columns read back as 'YYYY-MM-DD' text (connection.ts).
  const start = String(first.start)
  const fromTerm = zonedInstant(addDays(start, INVITATION_DAYS + 1), '00:00', course.timezone)
  return fromTerm > fromNow ? fromTerm : fromNow
}

/** A fresh invitation until `expiresAt`; the person's older open ones stop working (they expire now). */
export async function issueInvitation(db: Db, userId: number, createdBy: number | null, expiresAt: Date): Promise<IssuedInvitation> {
  const now = new Date()
  await db.updateTable('invitations').set({ expiresAt: now })
    .where('userId', '=', userId).where('usedAt', 'is', null).where('expiresAt', '>', now).execute()
  const token = randomBytes(32).toString('base64url')
  const row = await db.insertInto('invitations')
    .values({ userId, tokenHash: hashInvitationToken(token), expiresAt, createdBy })
    .returning('id').executeTakeFirstOrThrow()
  return { id: row.id, token, expiresAt }
}

export interface InvitationMail {
  invitation: IssuedInvitation
  to: { email: string, name: string }
  course: InvitingCourse
  /** What the account is for: a student's lab or a TA's sections. */
  role: 'student' | 'ta'
  invitedBy: string
  /** The resend round's exactly-once key; absent, the invitation's own. */
  key?: string
  createdBy: number | null
  /** The product's address (runtime config public.appUrl); the link starts with it. */
  appUrl: string
}

const WHAT_YOU_SEE = {
  student: 'where you will see your lab section, hood station, procedure cards and results.',
  ta: 'where you will see the sections you teach, their rosters and the runs to review.',
}
const HOW_ADDED = { student: 'added you to', ta: 'added you as a teaching assistant to' }

/** Plain text and HTML; names are escaped in the HTML, the link is ours. */
export async function queueInvitationMail(db: Db, mail: InvitationMail) {
  const link = `${mail.appUrl.replace(/\/$/, '')}/invite/${mail.invitation.token}`
  const course = mail.course
  const courseLabel = `${course.code} ${course.title}, ${course.term}`
  const until = `${displayDateTime(mail.invitation.expiresAt, course.timezone)} (${course.timezone})`
  const subject = `Your Halocline account for ${course.code}, ${course.term}`
  const added = `${mail.invitedBy} ${HOW_ADDED[mail.role]} ${courseLabel} in Halocline, ${WHAT_YOU_SEE[mail.role]}`
  const text = [
    `Hello ${mail.to.name},`,
    '',
    added,
    '',
    'Choose your password here:',
    link,
    '',
    `The link works once and until ${until}. If it has expired, ask your instructor for a new one.`,
    '',
  ].join('\n')
  const html = [
    `<p>Hello ${escapeHtml(mail.to.name)},</p>`,
    `<p>${escapeHtml(added)}</p>`,
    `<p><a href="${escapeHtml(link)}">Choose your password</a></p>`,
    `<p>The link works once and until ${escapeHtml(until)}. If it has expired, ask your instructor for a new one.</p>`,
  ].join('\n')
  return queueMail(db, {
    key: mail.key ?? `invitation:${mail.invitation.id}`,
    kind: 'invitation',
    to: [mail.to.email],
    subject,
    text,
    html,
    createdBy: mail.createdBy,
    courseId: course.id,
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

/** A person has joined once they chose a password or signed in through the campus provider. */
export function hasJoined(user: { passwordHash: string | null, campusJoinedAt: Date | null }): boolean {
  return user.passwordHash !== null || user.campusJoinedAt !== null
}

export type InvitationStateRow = { joined: boolean, lastExpiresAt: Date | null, lastUsedAt: Date | null }

/** accepted: the person has joined; invited: an open link; expired: the latest link ran out. */
export function invitationStateOf(row: InvitationStateRow): { state: 'accepted' | 'invited' | 'expired' | 'none'
  expiresAt: string | null } {
  if (row.joined) return { state: 'accepted', expiresAt: null }
  if (!row.lastExpiresAt) return { state: 'none', expiresAt: null }
  if (!row.lastUsedAt && row.lastExpiresAt.getTime() > Date.now()) return { state: 'invited', expiresAt: row.lastExpiresAt.toISOString() }
  return { state: 'expired', expiresAt: row.lastExpiresAt.toISOString() }
}
