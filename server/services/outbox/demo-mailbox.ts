import { readdir, readFile, stat } from 'node:fs/promises'
import { basename, join } from 'node:path'
import { simpleParser, type AddressObject } from 'mailparser'
import type { MailboxEntry, MailboxMessage } from '#shared/types/mail'
import type { SessionUser } from '#shared/types/auth'
import { createError } from 'h3'
import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { mailVisibleTo } from './scope'

// The local SMTP fake writes one .eml per message; in demo mode staff can read them here.

/** The fake's folder in demo mode (runtime config `public.demo` and `demoMailDir`), else 404. */
export function requireDemoMailbox(config: { public: { demo?: boolean }, demoMailDir?: string }): string {
  if (!config.public.demo || !config.demoMailDir) {
    throw createError({ statusCode: 404, statusMessage: 'The demo mailbox is only available in demo mode' })
  }
  return config.demoMailDir
}

function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return ''
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ')
}

/** Our Message-IDs carry the mail_messages id (`<halocline.ID.hash@host>`); anything else has none. */
function messageRowId(messageId: string | undefined): number | null {
  const m = messageId?.match(/^<halocline\.(\d+)\./)
  return m ? Number(m[1]) : null
}

/** Of these message ids, the ones the caller may read: the outbox's own scope. */
async function visibleIds(db: Kysely<Database>, me: SessionUser, ids: number[]): Promise<Set<number>> {
  if (!ids.length) return new Set()
  const rows = await db.selectFrom('mailMessages').select('id').where('id', 'in', ids).where(mailVisibleTo(me)).execute()
  return new Set(rows.map((r) => r.id))
}

async function parseFile(path: string): Promise<MailboxMessage & { rowId: number | null }> {
  const mail = await simpleParser(await readFile(path))
  return {
    rowId: messageRowId(mail.messageId),
    file: basename(path),
    subject: mail.subject ?? '(no subject)',
    from: addressText(mail.from),
    to: addressText(mail.to),
    date: mail.date?.toISOString() ?? null,
    attachments: mail.attachments.length,
    text: mail.text ?? '',
    html: typeof mail.html === 'string' ? mail.html : null,
    attachmentNames: mail.attachments.map((a) => a.filename ?? 'attachment'),
  }
}

/** How many of the newest files are read to fill one page of the caller's messages. */
const SCAN_LIMIT = 1000

// The fake holds everyone's mail (grades, invitation links): each caller sees only the messages
// the outbox would show them, matched by the Message-ID our sender sets.
export async function listMailbox(db: Kysely<Database>, me: SessionUser, dir: string, limit = 100): Promise<MailboxEntry[]> {
  const names = (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.eml'))
  const withTimes = await Promise.all(names.map(async (name) => ({ name, mtime: (await stat(join(dir, name))).mtimeMs })))
  const newest = withTimes.sort((a, b) => b.mtime - a.mtime).slice(0, SCAN_LIMIT)
  const parsed = await Promise.all(newest.map(({ name }) => parseFile(join(dir, name))))
  const allowed = await visibleIds(db, me, parsed.flatMap((p) => (p.rowId === null ? [] : [p.rowId])))
  return parsed.filter((p) => p.rowId !== null && allowed.has(p.rowId)).slice(0, limit)
    .map(({ text: _t, html: _h, attachmentNames: _a, rowId: _r, ...entry }) => entry)
}

export async function readMailboxFile(db: Kysely<Database>, me: SessionUser, dir: string, file: string): Promise<MailboxMessage> {
  // Only plain names the fake itself writes: no path can leave the mailbox folder.
  if (!/^[\w.-]+\.eml$/.test(file) || file !== basename(file)) {
    throw createError({ statusCode: 400, statusMessage: 'file: not a mailbox file name' })
  }
  const message = await parseFile(join(dir, file)).catch(() => null)
  // Someone else's message answers exactly like a missing one.
  if (!message || message.rowId === null || !(await visibleIds(db, me, [message.rowId])).has(message.rowId)) {
    throw createError({ statusCode: 404, statusMessage: 'Message not found' })
  }
  const { rowId: _r, ...rest } = message
  return rest
}
