import { randomUUID } from 'node:crypto'
import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, relative } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, DEMO, signedIn, type Answer, type Reply } from '../support/http'
import { closeTestDb, createUser, testDb, TEST_PASSWORD } from '../support/db'
import { insertResult, makeCourse } from '../support/fixtures'

// Control characters in text input: every route that reads a JSON body or an upload refuses them
// with a 400 naming the field, before anything reaches PostgreSQL (which refuses NUL itself and
// ended such requests in a 500). The rule (shared/utils/text-input.ts): never C0 controls other
// than tab, line feed and carriage return, DEL, C1 controls, lone surrogates or noncharacters;
// one-line fields refuse tabs and line breaks too. The code point names are Unicode's.

const API = join(process.cwd(), 'server', 'api')
const uid = randomUUID().slice(0, 6)

/** Every route file under server/api, relative ("courses/[id].patch.ts"). */
function routeFiles(dir = API): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name)
    return statSync(full).isDirectory() ? routeFiles(full) : [relative(API, full)]
  })
}
/** The routes that take text from the client: a JSON body or a multipart upload. */
const readsInput = (file: string) => /readBodyAs\(|readUpload\(/.test(readFileSync(join(API, file), 'utf8'))

// Routes whose body holds numbers only: nothing to sweep (their schemas still refuse junk).
const NO_TEXT = new Set(['enrollments/[id].patch.ts', 'stockroom/items/[id]/reagent.put.ts', 'account/daily-summary.put.ts', 'stockroom/items/[id]/dismiss-link.post.ts'])
// Fields where several lines are legitimate (notes, comments, reasons, an address).
const MULTI_LINE = new Set(['notes', 'storageNotes', 'comment', 'reason', 'deliverTo', 'source@methods', 'currentPassword', 'newPassword', 'password'])

type Sent = 'POST' | 'PATCH' | 'PUT' | 'DELETE'
interface JsonCase { kind: 'json', method: Sent, path: string, client: () => Client, body: Record<string, unknown>, area?: string }
interface UploadCase { kind: 'upload', path: string, client: () => Client, content: string, fields?: Record<string, string> }
type Case = JsonCase | UploadCase

let owner: Client, ta: Client, student: Client, coordinator: Client
let practicalId: number
const anonymous = () => new Client()
let cases: Record<string, Case>

beforeAll(async () => {
  const course = await makeCourse({ sections: 1, studentsPerSection: 1 })
  const section = course.sections[0]!
  owner = await signedIn(course.owner.email, TEST_PASSWORD)
  ta = await signedIn(section.ta.email, TEST_PASSWORD)
  student = await signedIn(section.students[0]!.email, TEST_PASSWORD)
  coordinator = await signedIn(DEMO.coordinator)
  const changer = await createUser('instructor')
  const submissionId = await insertResult(course.practicalId, section.id, section.students[0]!.id, { secondary: 3.2 }, { status: 'pending' })
  const db = testDb()
  const shared = await db.selectFrom('substrates').select('id').where('ownerId', 'is', null).where('name', '=', '1-chlorobutane').executeTakeFirstOrThrow()
  const sharedMethod = await db.selectFrom('methods').select('id').where('ownerId', 'is', null).where('reagent', '=', 'cl2-light').executeTakeFirstOrThrow()

  const created = async <T>(reply: Promise<Reply<T>>) => {
    const r = await reply
    if (r.status >= 300) throw new Error(`set-up failed: ${r.status} ${JSON.stringify(r.body)}`)
    return r.body
  }
  const substrate = await created(owner.post('/api/substrates', { name: `Butane ${uid}`, smiles: 'CCCC' }))
  const method = await created(owner.post('/api/methods', { name: `Sweep ${uid}`, reagent: 'cl2-light', temperatureC: 25, reactivity: { primary: 1, secondary: 3.8, tertiary: 5 }, source: 'From memory' }))
  const reagent = await created(coordinator.post('/api/stockroom/reagents', { name: `Sweep solvent ${uid}`, physicalState: 'liquid', containerSize: 100, unit: 'mL' }))
  const lot = await created(coordinator.post(`/api/stockroom/reagents/${reagent.id}/lots`, { quantity: 50, unit: 'mL', receivedOn: '2026-01-31' }))
  const line = { name: 'Acetone', supplierName: 'Supplier', supplierEmail: 'orders@supplier.example', catalogNumber: 'A-1', containers: 1, containerSize: 500, unit: 'mL', note: 'Any brand' }
  const draft = await created(coordinator.post('/api/stockroom/orders', { title: `Draft ${uid}` }))
  const sent = await created(coordinator.post('/api/stockroom/orders', { title: `Sent ${uid}` }))
  const sentLines = await created(coordinator.request(`/api/stockroom/orders/${sent.id}`, { method: 'PATCH', json: { lines: [{ ...line, reagentId: reagent.id, unit: 'mL' }] } }))
  await db.updateTable('orderSheets').set({ status: 'sent', sentAt: new Date('2026-11-02T10:00:00Z') }).where('id', '=', sent.id).execute()

  const sectionBody = { code: 'SW', weekday: 2, startTime: '08:00', endTime: '09:00', room: 'Sweep room', hoodStations: 10, firstDate: '2027-01-11', lastDate: '2027-04-30', skippedDates: ['2027-03-16'] }
  const courseBody = { code: `S${uid}`, title: 'Sweep course', term: 'Spring 2027', timezone: 'America/Chicago' }
  const copyBody = { term: 'Spring 2028', start: '2028-01-10', end: '2028-05-05' }
  const items = { items: [{ role: 'substrate', name: '1-chlorobutane', smiles: 'ClCCCC', basis: 'mmol', amount: 10, casNumber: '109-69-3' }] }
  const c = course.course.id
  const p = course.practicalId
  practicalId = p
  const json = (method: Sent, path: string, client: () => Client, body: Record<string, unknown>, area?: string): JsonCase => ({ kind: 'json', method, path, client, body, area })
  const upload = (path: string, client: () => Client, content: string, fields?: Record<string, string>): UploadCase => ({ kind: 'upload', path, client, content, fields })
  const roster = 'email,name,section\nsweep-student@test.example,Sweep Student,S1\n'
  const peaks = 'RT,Area\n2.10,1000\n3.20,2000\n'

  cases = {
    'auth/login.post.ts': json('POST', '/api/auth/login', anonymous, { email: `nobody-${uid}@test.example`, password: 'not-the-password-1' }),
    'account/password.post.ts': json('POST', '/api/account/password', () => owner, { currentPassword: TEST_PASSWORD, newPassword: 'another-long-password-1' }),
    'invitations/accept.post.ts': json('POST', '/api/invitations/accept', anonymous, { token: 'A'.repeat(43), password: 'a-long-new-password-1' }),
    'chemistry/analyze.post.ts': json('POST', '/api/chemistry/analyze', () => student, { smiles: 'CCC', halogen: 'Cl' }),
    'chemistry/reactivity.post.ts': json('POST', '/api/chemistry/reactivity', () => student, { smiles: 'CCC', observed: [{ smiles: 'ClCCC', percent: 45 }, { smiles: 'CC(Cl)C', percent: 55 }] }),
    'courses/index.post.ts': json('POST', '/api/courses', () => owner, courseBody),
    'courses/[id].patch.ts': json('PATCH', `/api/courses/${c}`, () => owner, courseBody),
    'courses/[id]/owners.post.ts': json('POST', `/api/courses/${c}/owners`, () => owner, { email: changer.email }),
    'courses/[id]/practicals.post.ts': json('POST', `/api/courses/${c}/practicals`, () => owner, { title: 'Sweep practical', substrateId: shared.id, methodId: sharedMethod.id, notes: 'Bring goggles' }),
    'courses/[id]/sections.post.ts': json('POST', `/api/courses/${c}/sections`, () => owner, sectionBody),
    'courses/[id]/settings.put.ts': json('PUT', `/api/courses/${c}/settings`, () => owner, { outlierTest: 'gesd', outlierAlpha: 0.05, zscoreLimit: 3.5, accuracyTolerancePercent: 25, releasePolicy: 'on-review', rubric: [{ key: 'accuracy', label: 'Accuracy', maxPoints: 10, kind: 'accuracy' }] }),
    'courses/[id]/roster/preview.post.ts': upload(`/api/courses/${c}/roster/preview`, () => owner, roster, { mapping: '{"email":"email"}' }),
    'courses/[id]/roster/import.post.ts': upload(`/api/courses/${c}/roster/import`, () => owner, roster, { mapping: '{"email":"email"}', confirmConflicts: 'false' }),
    'sections/[id].patch.ts': json('PATCH', `/api/sections/${section.id}`, () => owner, { ...sectionBody, code: 'S1' }),
    'courses/[id]/copy/index.post.ts': json('POST', `/api/courses/${c}/copy`, () => owner, copyBody),
    'courses/[id]/copy/preview.post.ts': json('POST', `/api/courses/${c}/copy/preview`, () => owner, copyBody),
    'courses/[id]/tas.post.ts': json('POST', `/api/courses/${c}/tas`, () => owner, { email: `ta-${uid}@test.example`, name: 'New TA', sectionIds: [section.id] }),
    'sections/[id]/enrollments.post.ts': json('POST', `/api/sections/${section.id}/enrollments`, () => owner, { email: `new-${uid}@test.example`, name: 'New Student' }),
    'practicals/[id].patch.ts': json('PATCH', `/api/practicals/${p}`, () => owner, { title: 'Renamed practical', notes: 'Bring goggles' }),
    'practicals/[id]/digests.post.ts': json('POST', `/api/practicals/${p}/digests`, () => owner, { sectionIds: [section.id], sendAt: '2099-01-05T10:00:00Z' }),
    'practicals/[id]/items.put.ts': json('PUT', `/api/practicals/${p}/items`, () => owner, items),
    'practicals/[id]/items/preview.post.ts': json('POST', `/api/practicals/${p}/items/preview`, () => owner, items),
    'practicals/[id]/sessions.put.ts': json('PUT', `/api/practicals/${p}/sessions`, () => owner, { sessions: [{ sectionId: section.id, meetingDate: '2026-10-05', dueAt: '2026-10-12T23:59:00Z' }] }),
    'practicals/[id]/queue/accept.post.ts': json('POST', `/api/practicals/${p}/queue/accept`, () => ta, { submissionIds: [submissionId], scores: { chromatogram: 5 } }),
    'practicals/[id]/submissions/index.post.ts': upload(`/api/practicals/${p}/submissions`, () => student, peaks),
    'practicals/[id]/submissions/preview.post.ts': upload(`/api/practicals/${p}/submissions/preview`, () => student, peaks),
    'submissions/[id]/review.post.ts': json('POST', `/api/submissions/${submissionId}/review`, () => ta, { decision: 'return', reason: 'The peaks are swapped', comment: 'Check the windows', scores: {} }),
    'submissions/[id]/exclusion.post.ts': json('POST', `/api/submissions/${submissionId}/exclusion`, () => ta, { reason: 'Solvent peak counted' }),
    'substrates/index.post.ts': json('POST', '/api/substrates', () => owner, { name: `Pentane ${uid}`, smiles: 'CCCCC', casNumber: '109-66-0', notes: 'Column B', source: 'From memory' }),
    'substrates/preview.post.ts': json('POST', '/api/substrates/preview', () => owner, { smiles: 'CCC' }),
    'substrates/[id].patch.ts': json('PATCH', `/api/substrates/${substrate.id}`, () => owner, { name: `Butane ${uid} b`, notes: 'Column B', source: 'From memory' }),
    'substrates/[id]/windows.put.ts': json('PUT', `/api/substrates/${substrate.id}/windows`, () => owner, { windows: [{ kind: 'solvent', label: 'dichloromethane', rtMin: 1, rtMax: 1.2 }], names: [{ productSmiles: 'ClCCCC', name: '1-chlorobutane' }] }),
    'substrates/[id]/references/[reagent].put.ts': json('PUT', `/api/substrates/${substrate.id}/references/cl2-light`, () => owner, { percents: [{ productSmiles: 'ClCCCC', percent: 30 }, { productSmiles: 'CC(Cl)CC', percent: 70 }], source: 'From memory', sourceKind: 'from-memory' }),
    'substrates/[id]/standard-runs.post.ts': upload(`/api/substrates/${substrate.id}/standard-runs`, () => owner, peaks),
    'methods/index.post.ts': json('POST', '/api/methods', () => owner, { name: `Method ${uid}`, reagent: 'cl2-light', temperatureC: 25, reactivity: { primary: 1, secondary: 3.8, tertiary: 5 }, source: 'From memory', notes: 'Lamp 2' }, 'methods'),
    'methods/[id].patch.ts': json('PATCH', `/api/methods/${method.id}`, () => owner, { name: `Method ${uid} b`, source: 'From memory', notes: 'Lamp 2' }, 'methods'),
    'stockroom/reagents/index.post.ts': json('POST', '/api/stockroom/reagents', () => coordinator, { name: `Reagent ${uid}`, casNumber: '75-09-2', physicalState: 'liquid', containerSize: 100, unit: 'mL', formula: 'C4H10', supplierName: 'Supplier', supplierEmail: 'orders@supplier.example', catalogNumber: 'C-1', storageNotes: 'Flammables cabinet', signalWord: 'Danger', hazardCodes: ['H225'] }),
    'stockroom/reagents/[id].patch.ts': json('PATCH', `/api/stockroom/reagents/${reagent.id}`, () => coordinator, { name: `Sweep solvent ${uid}`, supplierName: 'Supplier', catalogNumber: 'C-2', storageNotes: 'Cool' }),
    'stockroom/reagents/[id]/lots.post.ts': json('POST', `/api/stockroom/reagents/${reagent.id}/lots`, () => coordinator, { lotCode: 'L-1', quantity: 10, unit: 'mL', location: 'Cabinet 2', receivedOn: '2026-01-31' }),
    'stockroom/lots/[id].patch.ts': json('PATCH', `/api/stockroom/lots/${lot.id}`, () => coordinator, { lotCode: 'L-2', location: 'Shelf 4', openedOn: '2026-02-01' }),
    'stockroom/lots/[id]/usage.post.ts': json('POST', `/api/stockroom/lots/${lot.id}/usage`, () => coordinator, { usedOn: '2026-02-02', amount: 1, note: 'GC dilution' }),
    'stockroom/orders/index.post.ts': json('POST', '/api/stockroom/orders', () => coordinator, { title: 'Sweep order' }),
    'stockroom/orders/[id].patch.ts': json('PATCH', `/api/stockroom/orders/${draft.id}`, () => coordinator, { title: 'Sweep draft', notes: 'Quote by Friday', lines: [line] }),
    'stockroom/orders/[id]/receive.post.ts': json('POST', `/api/stockroom/orders/${sent.id}/receive`, () => coordinator, { receivedOn: '2026-12-01', lines: [{ lineId: sentLines.lines[0]!.id, containers: 1, lotCode: 'R-1', location: 'Shelf 1', expiresOn: '2027-12-01' }] }),
    'stockroom/orders/[id]/close.post.ts': json('POST', `/api/stockroom/orders/${sent.id}/close`, () => coordinator, { reason: 'Discontinued by the supplier' }),
    'stockroom/settings.put.ts': json('PUT', '/api/stockroom/settings', () => coordinator, { deliverTo: 'Stockroom, Bellweather Hall', rinseMlPerUnit: 10 }),
  }
})
afterAll(closeTestDb)

/** Every string in a body, with its path ("lines.0.name"). */
function stringLeaves(value: unknown, path: string[] = []): Array<{ path: string[], value: string }> {
  if (typeof value === 'string') return [{ path, value }]
  if (Array.isArray(value)) return value.flatMap((v, i) => stringLeaves(v, [...path, String(i)]))
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => stringLeaves(v, [...path, k]))
  return []
}
function replaced(body: unknown, path: string[], text: string): unknown {
  if (!path.length) return text
  const [key, ...rest] = path as [string, ...string[]]
  if (Array.isArray(body)) return body.map((v: unknown, i) => (String(i) === key ? replaced(v, rest, text) : v))
  const copy = { ...(body as Record<string, unknown>) }
  copy[key] = replaced(copy[key], rest, text)
  return copy
}
/** The character after the first one, where trimming cannot take it away. */
const inside = (value: string, char: string) => `${value.slice(0, 1)}${char}${value.slice(1)}`
const send = (c: JsonCase, body: unknown) => c.client().request(c.path, { method: c.method, json: body })
function sendUpload(c: UploadCase, fileName: string, fields: Record<string, string> = c.fields ?? {}) {
  const form = new FormData()
  form.append('file', new File([c.content], fileName, { type: 'text/csv' }))
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  return c.client().request(c.path, { method: 'POST', body: form })
}

// Unicode names: NUL, START OF HEADING, ESCAPE, DELETE, NEXT LINE (C1), a lone high surrogate,
// the noncharacters U+FFFE and U+1FFFF.
const CONTROLS: Array<[string, string]> = [
  ['\u0001', 'U+0001'], ['\u001B', 'U+001B'], ['\u007F', 'U+007F'], ['\u0085', 'U+0085'],
  ['\uD800', 'U+D800'], ['\uFFFE', 'U+FFFE'], ['\u{1FFFF}', 'U+1FFFF'],
]

describe('control characters in text input', () => {
  it('every route that takes a body or an upload is in the sweep', () => {
    const taking = routeFiles().filter(readsInput).sort()
    expect(taking.length).toBeGreaterThan(40)
    expect([...Object.keys(cases), ...NO_TEXT].sort()).toEqual(taking)
  })

  it('a NUL, and another control character, in any JSON text field is a 400 naming the field', async () => {
    const failures: string[] = []
    let n = 0
    for (const [file, c] of Object.entries(cases)) {
      if (c.kind !== 'json') continue
      const leaves = stringLeaves(c.body)
      // The bulk acceptance's only text is a record's keys: the next test sweeps those.
      expect(leaves.length > 0 || file === 'practicals/[id]/queue/accept.post.ts', file).toBe(true)
      for (const leaf of leaves) {
        const [char, label] = CONTROLS[n++ % CONTROLS.length]!
        for (const [bad, name] of [['\u0000', 'U+0000'], [char, label]] as Array<[string, string]>) {
          const reply = await send(c, replaced(c.body, leaf.path, inside(leaf.value, bad)))
          const expected = `${leaf.path.join('.')}: Remove the control character ${name}`
          if (reply.status !== 400 || reply.refusal?.statusMessage !== expected) failures.push(`${file} ${leaf.path.join('.')} ${name}: ${reply.status} ${reply.refusal?.statusMessage}`)
        }
      }
    }
    expect(failures).toEqual([])
  })

  it('a tab or line break in a one-line field is a 400 too; never a 500', async () => {
    const failures: string[] = []
    for (const [file, c] of Object.entries(cases)) {
      if (c.kind !== 'json') continue
      for (const leaf of stringLeaves(c.body)) {
        const key = leaf.path.at(-1)!
        if (MULTI_LINE.has(key) || MULTI_LINE.has(`${key}@${c.area}`)) continue
        for (const br of ['\n', '\t']) {
          const reply = await send(c, replaced(c.body, leaf.path, inside(leaf.value, br)))
          // A SMILES string is read by the chemistry engine, which answers in its own sentence.
          const named = reply.refusal?.statusMessage?.startsWith(`${leaf.path.join('.')}: `) || key === 'smiles'
          if (reply.status !== 400 || !named) failures.push(`${file} ${leaf.path.join('.')} ${JSON.stringify(br)}: ${reply.status} ${reply.refusal?.statusMessage}`)
        }
      }
    }
    expect(failures).toEqual([])
  })

  it('a key of a record with a control character is refused', async () => {
    const c = cases['practicals/[id]/queue/accept.post.ts'] as JsonCase
    const reply = await send(c, { ...c.body, scores: { 'chroma\u0000togram': 5 } })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toBe('scores: Remove the control character U+0000 from a key')
  })

  it('several lines stay allowed where they make sense: practical notes keep tabs and line breaks', async () => {
    const c = cases['practicals/[id].patch.ts'] as JsonCase
    const notes = 'Weigh in the hood.\n\tThen add the initiator.\r\nGoggles on.'
    expect((await send(c, { notes })).status).toBe(200)
    const row = await testDb().selectFrom('practicals').select('notes').where('id', '=', practicalId).executeTakeFirstOrThrow()
    expect(row.notes).toBe(notes)
    const refused = await send(c, { title: 'Two\nlines' })
    expect(refused.status).toBe(400)
    expect(refused.refusal.statusMessage).toBe('title: Use one line: no tabs or line breaks')
  })

  it('an uploaded file whose name holds a control character is a 400 naming the file; the student upload included', async () => {
    const failures: string[] = []
    for (const [file, c] of Object.entries(cases)) {
      if (c.kind !== 'upload') continue
      for (const [bad, label] of [['\u0000', 'U+0000'], ['\u0007', 'U+0007'], ['\n', 'U+000A']]) {
        const reply = await sendUpload(c, `run${bad}1.csv`)
        const expected = `file: Rename the file: its name holds the control character ${label}`
        if (reply.status !== 400 || reply.refusal?.statusMessage !== expected) failures.push(`${file} ${label}: ${reply.status} ${reply.refusal?.statusMessage}`)
      }
    }
    expect(failures).toEqual([])
    const names = await testDb().selectFrom('files').select('originalName').where('originalName', 'like', 'run%1.csv').execute()
    expect(names).toEqual([])
  })

  it('a control character in a form field of an upload is a 400 naming the field', async () => {
    const c = cases['courses/[id]/roster/import.post.ts'] as UploadCase
    const reply = await sendUpload(c, 'roster.csv', { mapping: '{"email":"e\u0000mail"}' })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toBe('mapping: Remove the control character U+0000')
  })

  it('a query string with a NUL is a 400 naming the parameter', async () => {
    const schedule = await owner.get('/api/schedule?from=2026-10-01%00&to=2026-10-31')
    expect(schedule.status).toBe(400)
    expect(schedule.refusal.statusMessage).toBe('from: Remove the control character U+0000')
    const queue = await ta.get(`/api/practicals/${practicalId}/queue?flag=%00`)
    expect(queue.status).toBe(400)
    expect(queue.refusal.statusMessage).toBe('flag: Remove the control character U+0000')
  })
})

describe('control characters inside an uploaded roster', () => {
  const roster = () => cases['courses/[id]/roster/preview.post.ts'] as UploadCase
  const importCase = () => cases['courses/[id]/roster/import.post.ts'] as UploadCase

  it('a NUL byte makes the file binary: 415, nothing imported', async () => {
    const c = { ...importCase(), content: 'email,name,section\nnul-student@test.example,Nul\u0000 Student,S1\n' }
    const reply = await sendUpload(c, 'roster.csv', {})
    expect(reply.status).toBe(415)
    expect(await testDb().selectFrom('users').select('id').where('email', '=', 'nul-student@test.example').execute()).toEqual([])
  })

  it('a UTF-16 file with a NUL character is refused with a 4xx', async () => {
    const text = 'email,name,section\nwide-student@test.example,Wide\u0000 Student,S1\n'
    const bytes = Buffer.concat([Buffer.from([0xFF, 0xFE]), Buffer.from(text, 'utf16le')])
    const form = new FormData()
    form.append('file', new File([bytes], 'wide.csv', { type: 'text/csv' }))
    const reply = await owner.request(importCase().path, { method: 'POST', body: form })
    expect(reply.status).toBeGreaterThanOrEqual(400)
    expect(reply.status).toBeLessThan(500)
  })

  it('another control character in a name is a row error in the preview, and that row is skipped on import', async () => {
    const content = 'email,name,section\nbell-student@test.example,Bell\u0007 Student,S1\nfine-student@test.example,Fine Student,S1\n'
    const seen = await sendUpload({ ...roster(), content }, 'roster.csv', {})
    expect(seen.status).toBe(200)
    // The sweep's paths are data, so the reply is read as the roster preview the route declares.
    const rows = (seen.body as Answer<'/api/courses/:id/roster/preview', 'post'>).rows
    expect(rows[0]!.outcome).toBe('error')
    expect(rows[0]!.errors).toEqual([{ field: 'name', message: 'Remove the control character U+0007' }])
    expect(rows[1]!.outcome).toBe('new')
    const done = await sendUpload({ ...importCase(), content }, 'roster.csv', {})
    expect(done.status).toBe(201)
    const result = done.body as Answer<'/api/courses/:id/roster/import', 'post'>
    expect(result.skipped.map((r) => [r.row, r.reasons])).toEqual([[2, ['Remove the control character U+0007']]])
    const written = await testDb().selectFrom('users').select('email').where('email', 'in', ['bell-student@test.example', 'fine-student@test.example']).execute()
    expect(written.map((u) => u.email)).toEqual(['fine-student@test.example'])
  })
})
