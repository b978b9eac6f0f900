// The section digests table. Kept apart from schema.ts; schema.ts's Database extends this.
import type { ColumnType, Generated, Selectable } from 'kysely'

type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>

export type DigestStatus = 'queued' | 'scheduled'

export interface DigestsTable {
  id: Generated<number>
  practicalId: number
  sectionId: number
  requestKey: string | null
  scheduledAt: Timestamp | null
  /** As created: 'scheduled' when it waits for a later time. Delivery lives in mail_messages. */
  status: Generated<DigestStatus>
  recipientCount: Generated<number>
  createdBy: number | null
  createdAt: CreatedAt
}

export interface DigestTables {
  digests: DigestsTable
}

export type Digest = Selectable<DigestsTable>
