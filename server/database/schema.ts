import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

// Timestamps come back from pg as Date and go in as Date or ISO text.
type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type Json<T = unknown> = ColumnType<T, string, string>

export type Role = 'instructor' | 'ta' | 'coordinator' | 'student'

export interface UsersTable {
  id: Generated<number>
  email: string
  name: string
  role: Role
  passwordHash: string | null
  sessionVersion: Generated<number>
  disabledAt: Timestamp | null
  createdAt: CreatedAt
  updatedAt: Generated<Timestamp>
}

export interface LoginAttemptsTable {
  id: Generated<number>
  email: string
  ip: string
  succeeded: boolean
  createdAt: CreatedAt
}

export interface AuditLogTable {
  id: Generated<number>
  actorId: number | null
  action: string
  entity: string
  entityId: string | null
  before: Json | null
  after: Json | null
  ip: string | null
  createdAt: CreatedAt
}

export type MailStatus = 'queued' | 'sending' | 'sent' | 'retrying' | 'failed'

export interface MailAttachment {
  filename: string
  contentType: string
  /** base64 */
  content: string
}

export interface MailMessagesTable {
  id: Generated<number>
  dedupeKey: string
  kind: string
  toAddresses: string[]
  subject: string
  textBody: string
  htmlBody: string | null
  attachments: Json<MailAttachment[]>
  status: Generated<MailStatus>
  attempts: Generated<number>
  lastError: string | null
  providerMessageId: string | null
  createdBy: number | null
  scheduledAt: Timestamp | null
  sentAt: Timestamp | null
  createdAt: CreatedAt
  updatedAt: Generated<Timestamp>
}

export interface Database {
  users: UsersTable
  loginAttempts: LoginAttemptsTable
  auditLog: AuditLogTable
  mailMessages: MailMessagesTable
}

export type User = Selectable<UsersTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
export type MailMessage = Selectable<MailMessagesTable>
export type NewMailMessage = Insertable<MailMessagesTable>
