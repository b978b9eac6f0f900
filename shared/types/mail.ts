export type MailStatus = 'queued' | 'sending' | 'sent' | 'retrying' | 'failed'

export const MAIL_STATUS_LABELS: Record<MailStatus, string> = {
  queued: 'Waiting to send',
  sending: 'Sending',
  sent: 'Delivered to mail server',
  retrying: 'Will retry',
  failed: 'Gave up',
}

export interface OutboxMessage {
  id: number
  kind: string
  to: string[]
  subject: string
  status: MailStatus
  attempts: number
  /** Attempts interrupted before their outcome was known; the next one reused the Message-ID. */
  unknownOutcomes: number
  lastError: string | null
  scheduledAt: string | null
  sentAt: string | null
  createdAt: string
}

export interface MailboxEntry {
  file: string
  subject: string
  from: string
  to: string
  date: string | null
  attachments: number
}

export interface MailboxMessage extends MailboxEntry {
  text: string
  html: string | null
  attachmentNames: string[]
}

/** What each kind of message is, in words, for the outbox; unknown kinds show their code. */
export const MAIL_KIND_LABELS: Record<string, string> = {
  'invitation': 'Invitation',
  'digest-student': 'Digest (student)',
  'digest-staff': 'Digest (staff)',
  'purchase-request': 'Purchase request',
  'test': 'Test message',
}

export const mailKindLabel = (kind: string) => MAIL_KIND_LABELS[kind] ?? kind
