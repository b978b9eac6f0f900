import { readdir, readFile, stat } from 'node:fs/promises'
import { basename, join } from 'node:path'
import { simpleParser, type AddressObject } from 'mailparser'
import type { MailboxEntry, MailboxMessage } from '#shared/types/mail'

// The local SMTP fake writes one .eml per message; in demo mode staff can read them here.
export function requireDemoMailbox(): string {
  const config = useRuntimeConfig()
  if (!config.public.demo || !config.demoMailDir) {
    throw createError({ statusCode: 404, statusMessage: 'The demo mailbox is only available in demo mode' })
  }
  return config.demoMailDir
}

function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return ''
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ')
}

async function parseFile(path: string): Promise<MailboxMessage> {
  const mail = await simpleParser(await readFile(path))
  return {
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

export async function listMailbox(dir: string, limit = 100): Promise<MailboxEntry[]> {
  const names = (await readdir(dir).catch(() => [] as string[])).filter((n) => n.endsWith('.eml'))
  const withTimes = await Promise.all(names.map(async (name) => ({ name, mtime: (await stat(join(dir, name))).mtimeMs })))
  const newest = withTimes.sort((a, b) => b.mtime - a.mtime).slice(0, limit)
  const parsed = await Promise.all(newest.map(({ name }) => parseFile(join(dir, name))))
  return parsed.map(({ text: _t, html: _h, attachmentNames: _a, ...entry }) => entry)
}

export async function readMailboxFile(dir: string, file: string): Promise<MailboxMessage> {
  // Only plain names the fake itself writes: no path can leave the mailbox folder.
  if (!/^[\w.-]+\.eml$/.test(file) || file !== basename(file)) {
    throw createError({ statusCode: 400, statusMessage: 'file: not a mailbox file name' })
  }
  try {
    return await parseFile(join(dir, file))
  } catch {
    throw createError({ statusCode: 404, statusMessage: 'Message not found' })
  }
}
