import { createHash } from 'node:crypto'
import { sql } from 'kysely'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, createUser, testDb } from '../../support/db'
import { auditRowsOf, demoPracticalScope } from '../../support/services-fixtures'
import { storeSubmissionVersion, type NewVersion } from '../../../server/services/submissions/uploads'
import type { PracticalScope } from '../../../server/utils/access'
import type { Actor } from '../../../server/utils/audit'
import type { RunResult } from '../../../shared/utils/submission'
import { packPeaks, unpackPeaks } from '../../../shared/utils/lib/stored-peaks'

afterAll(closeTestDb)

// Storing a version of a work unit, without the engines: a run as the engine would return it
// (two assigned peaks of a made-up peak table) and the file's bytes.
let scope: PracticalScope

beforeAll(async () => {
  scope = await demoPracticalScope()
})

function upload(text: string) {
  const bytes = Buffer.from(text)
  const file: NewVersion['file'] = { name: 'run.csv', bytes, claimedType: 'text/csv', sha256: createHash('sha256').update(bytes).digest('hex') }
  return file
}

const peaks: RunResult['peaks'] = [{ retentionTime: 3.1, area: 1200, assignedTo: null }, { retentionTime: 4.2, area: 2400, assignedTo: null }]
const run: Omit<RunResult, 'peaks'> = {
  kind: 'peak-table',
  molePercents: [],
  factors: { secondaryToPrimary: 3.6, tertiaryToPrimary: null },
  relative: [],
  conversion: null,
  unassignedPercent: 0,
  warnings: [],
  flags: [{ code: 'low-area', severity: 'warning', message: 'A small peak' }],
}

async function pair(): Promise<{ actor: Actor, partner: number, unit: NewVersion['unit'] }> {
  const a = await createUser('student')
  const b = await createUser('student')
  const unit = { sectionId: scope.sessionSectionIds[0]!, unitKey: `user:${a.id}`, memberIds: [a.id, b.id] }
  return { actor: { id: a.id, name: 'Test student', role: 'student', ip: '198.51.100.4' }, partner: b.id, unit }
}

describe('storeSubmissionVersion', () => {
  it('stores the bytes, the run, the members and an audit row, numbering versions per unit', async () => {
    const { actor, partner, unit } = await pair()
    const base = {
      practicalId: scope.practical.id, unit, mediaType: 'text/plain', run, storedPeaks: packPeaks(peaks), keyFactor: 'secondaryToPrimary' as const, late: true,
    }
    const first = await storeSubmissionVersion(testDb(), actor, { ...base, file: upload('rt,area\n3.1,1200\n'), idempotencyKey: null })
    const second = await storeSubmissionVersion(testDb(), actor, { ...base, file: upload('rt,area\n3.1,1300\n'), idempotencyKey: 'k-2' })
    expect([first.version, second.version]).toEqual([1, 2])
    expect(second).toMatchObject({ status: 'pending', late: true, attention: 1, factorSecondary: 3.6, idempotencyKey: 'k-2', submittedBy: actor.id })
    const file = await testDb().selectFrom('files').selectAll().where('id', '=', first.fileId).executeTakeFirstOrThrow()
    expect(file.content.toString()).toBe('rt,area\n3.1,1200\n')
    const members = await testDb().selectFrom('submissionMembers').select('userId').where('submissionId', '=', first.id).execute()
    expect(members.map((m) => m.userId).sort((x, y) => x - y)).toEqual([actor.id, partner].sort((x, y) => x - y))
    const [audit] = await auditRowsOf('submission', second.id)
    expect(audit).toMatchObject({ action: 'submission.create', actorId: actor.id, ip: '198.51.100.4' })
    expect(audit!.after).toMatchObject({ version: 2, unitKey: unit.unitKey, late: true })
  })

  it('numbers two uploads of one unit at once n and n + 1, each with its own file and members', async () => {
    const { actor, unit } = await pair()
    const base = {
      practicalId: scope.practical.id, unit, mediaType: 'text/plain', run, storedPeaks: packPeaks(peaks), keyFactor: 'secondaryToPrimary' as const, late: false,
    }
    const stored = await Promise.all(['a', 'b', 'c'].map((x) => storeSubmissionVersion(testDb(), actor, { ...base, file: upload(`${x}\n`), idempotencyKey: null })))
    expect(stored.map((s) => s.version).sort()).toEqual([1, 2, 3])
    expect(new Set(stored.map((s) => s.fileId)).size).toBe(3)
    const members = await testDb().selectFrom('submissionMembers').select('submissionId').where('submissionId', 'in', stored.map((s) => s.id)).execute()
    expect(members).toHaveLength(6)
  })

  it('writes nothing when the transaction fails part way (a reused Idempotency-Key)', async () => {
    const { actor, unit } = await pair()
    const base = {
      practicalId: scope.practical.id, unit, mediaType: 'text/plain', run, storedPeaks: packPeaks(peaks), keyFactor: 'secondaryToPrimary' as const, late: false,
    }
    await storeSubmissionVersion(testDb(), actor, { ...base, file: upload('a\n'), idempotencyKey: 'same' })
    const filesBefore = await testDb().selectFrom('files').select('id').where('uploadedBy', '=', actor.id).execute()
    await expect(storeSubmissionVersion(testDb(), actor, { ...base, file: upload('b\n'), idempotencyKey: 'same' }))
      .rejects.toMatchObject({ code: '23505' })
    const versions = await testDb().selectFrom('submissions').select('version').where('unitKey', '=', unit.unitKey).execute()
    expect(versions).toEqual([{ version: 1 }])
    // The file row of the refused version went with it.
    const filesAfter = await testDb().selectFrom('files').select('id').where('uploadedBy', '=', actor.id).execute()
    expect(filesAfter).toHaveLength(filesBefore.length)
  })

  it('keeps a long file byte for byte (lz4 where the server has it) and its peaks as the engine gave them', async () => {
    const { actor, unit } = await pair()
    const lines = ['Time (min),Signal (pA)', ...Array.from({ length: 3000 }, (_, i) => `${(i / 300).toFixed(5)},${(0.5 + (i % 17) / 100).toFixed(4)}`)]
    const file = upload(`${lines.join('\n')}\n`)
    const many = Array.from({ length: 2000 }, (_, i) => ({ retentionTime: 0.5 + i / 500, area: 1000 + i, row: i + 2, assignedTo: i % 7 ? null : 'CCCCl' }))
    const stored = await storeSubmissionVersion(testDb(), actor, {
      practicalId: scope.practical.id, unit, mediaType: 'text/plain', run, storedPeaks: packPeaks(many),
      keyFactor: 'secondaryToPrimary', late: false, file, idempotencyKey: null,
    })
    const { rows: [row] } = await sql<{ content: Buffer, peaks: Buffer, fileCompression: string | null, lz4: boolean }>`
      select f.content, s.peaks, pg_column_compression(f.content) as "fileCompression",
        (select 'lz4' = any(enumvals) from pg_settings where name = 'default_toast_compression') as lz4
      from submissions s join files f on f.id = s.file_id where s.id = ${stored.id}`.execute(testDb())
    expect(Buffer.compare(row!.content, file.bytes)).toBe(0)
    // What the peaks were when stored as JSON: the same numbers and labels, read back.
    expect(unpackPeaks(row!.peaks)).toEqual(JSON.parse(JSON.stringify(many)))
    expect(row!.fileCompression).toBe(row!.lz4 ? 'lz4' : 'pglz')
  })
})
