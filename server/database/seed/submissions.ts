import { createHash } from 'node:crypto'
import type { Kysely } from 'kysely'
import type { Database } from '../schema'
import type { SeedContext } from './context'
import { DEMO_SECTIONS } from './course'
import { DEMO_DOMAIN } from './people'
// Seed files run outside Nitro: engine code comes in by relative path.
import { canonicalSmiles } from '../../../shared/utils/halogenation'
import { mulberry32, normalRandom, simulatePeakTable, type BadRun, type ExportStyle } from '../../../shared/utils/simulation'
import { attentionOf, evaluateRun, practicalChemistryOf, type PracticalChemistry } from '../../../shared/utils/submission'
import { startingScores } from '../../../shared/utils/grading'
import { packPeaks } from '../../../shared/utils/lib/stored-peaks'
import { substrateProductNamer, substrateReferenceFor } from '../../services/library/product-names'
import { stationUnitKey } from '../../services/submissions/work-units'
import { storedResultOf } from '../../services/submissions/stored-result'

// Invented GC results for practical 1, which met four weeks before the seeding day: one upload
// per pair, realistic pair-to-pair scatter, the classic bad runs, and reviews by the TAs.
// The "true" per-H reactivities below are invented for the demo, relative to the CH3 carbon: the
// carbons near the chlorine are made less reactive, as its inductive pull suggests (common
// practice), so the class lands near the library's reference distribution (6 / 23 / 46 / 25 %)
// rather than the class model's 11.5 / 35.6 / 35.6 / 17.3 %.
const DEMO_TRUTH = { c1: 0.4, c2: 1.5, c3: 2.7, c4: 1.0 }

const BAD: Record<string, { fault: BadRun, note: string }> = {
  'M1:3': { fault: 'solvent-as-product', note: 'solvent integrated as a product' },
  'T1:5': { fault: 'swapped-peaks', note: 'two products swapped' },
  'W1:2': { fault: 'missing-product', note: 'a product not integrated' },
  'R1:7': { fault: 'split-peak', note: 'a split peak' },
}
const STYLES: ExportStyle[] = ['csv', 'tab', 'semicolon-decimal-comma', 'aligned', 'csv-seconds']

interface Unit { section: string, sectionId: number, station: number, members: number[], names: string[] }

async function unitsOf(ctx: SeedContext): Promise<Unit[]> {
  const units: Unit[] = []
  for (const s of DEMO_SECTIONS) {
    const sectionId = ctx.ids.sections.get(s.code)!
    const rows = await ctx.db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
      .select(['enrollments.userId', 'enrollments.station', 'users.name'])
      .where('enrollments.sectionId', '=', sectionId)
      .orderBy('enrollments.station').orderBy('enrollments.seat')
      .execute()
    const byStation = new Map<number, typeof rows>()
    for (const r of rows) byStation.set(r.station!, [...(byStation.get(r.station!) ?? []), r])
    for (const [station, members] of byStation) {
      units.push({ section: s.code, sectionId, station, members: members.map((m) => m.userId), names: members.map((m) => m.name) })
    }
  }
  return units
}

// Each dichlorobutane by the carbon chlorinated (C1 bears the first chlorine).
const SITE_OF: Record<string, keyof typeof DEMO_TRUTH> = { 'ClC(Cl)CCC': 'c1', 'ClCC(Cl)CC': 'c2', 'ClCCC(Cl)C': 'c3', 'ClCCCCCl': 'c4' }

/** The pair's own reactivities: the demo truth with log-normal scatter, site by site. */
function pairDistribution(chem: PracticalChemistry, seed: number) {
  const gauss = normalRandom(mulberry32(seed))
  const site = new Map(Object.entries(SITE_OF).map(([smiles, key]) => [canonicalSmiles(smiles), key]))
  const weights = chem.products.map((p) => p.hydrogens * DEMO_TRUTH[site.get(p.smiles)!] * Math.exp(0.12 * gauss()))
  const total = weights.reduce((a, b) => a + b, 0)
  return chem.products.map((p, i) => ({ smiles: p.smiles, percent: (weights[i]! / total) * 100 }))
}

/** A practical's rubric and chemistry as the upload route computes it, for seeding its results. */
export async function seededPracticalChemistry(db: Kysely<Database>, practicalId: number) {
  const practical = await db.selectFrom('practicals').innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
    .innerJoin('methods', 'methods.id', 'practicals.methodId').innerJoin('courses', 'courses.id', 'practicals.courseId')
    .select([
      'substrates.id as substrateId', 'substrates.smiles',
      'methods.halogen', 'methods.reagent', 'methods.rPrimary', 'methods.rSecondary', 'methods.rTertiary',
      'courses.rubric', 'courses.accuracyTolerancePercent',
    ])
    .where('practicals.id', '=', practicalId).executeTakeFirstOrThrow()
  const windows = await db.selectFrom('substrateWindows')
    .select(['kind', 'productSmiles', 'rtMin', 'rtMax', 'responseFactor'])
    .where('substrateId', '=', practical.substrateId)
    .execute()
  const chem = practicalChemistryOf(practical.smiles, practical, windows, {
    nameOf: await substrateProductNamer(db, practical.substrateId),
    reference: await substrateReferenceFor(db, practical.substrateId, practical.reagent),
  })
  return { practical, chem }
}

export async function seedSubmissions(ctx: SeedContext): Promise<void> {
  const practicalId = ctx.ids.practicals.get('p1')
  if (!practicalId) return
  const db = ctx.db
  const { practical, chem } = await seededPracticalChemistry(db, practicalId)
  const sessionRows = await db.selectFrom('practicalSessions')
    .select(['sectionId', 'meetingDate', 'dueAt'])
    .where('practicalId', '=', practicalId)
    .execute()
  const sessions = new Map(sessionRows.map((s) => [s.sectionId, s]))
  const tas = { M1: 'ta1', W1: 'ta1', T1: 'ta2', R1: 'ta2' } as Record<string, string>

  let seed = 1000
  for (const unit of await unitsOf(ctx)) {
    seed += 17
    const key = `${unit.section}:${unit.station}`
    const bad = BAD[key]
    const session = sessions.get(unit.sectionId)!
    const truth = pairDistribution(chem, seed)
    const text = simulatePeakTable({
      seed, windows: chem.windows, distribution: truth, areaNoise: 0.025, rtJitter: 0.2,
      solvent: { retentionTime: 1.38, area: 2_400_000 }, startingMaterial: { retentionTime: 2.27, area: 410_000 },
      fault: bad?.fault ?? 'none', style: STYLES[seed % STYLES.length],
    }).text
    // A few students upload after the due date.
    const hoursAfterMeeting = unit.station === 8 && unit.section === 'T1' ? 24 * 8 : 6 + (seed % 72)
    const uploadedAt = new Date(Date.parse(`${session.meetingDate}T18:00:00Z`) + hoursAfterMeeting * 3_600_000)
    const uploader = unit.members[seed % unit.members.length]!
    const first = await storeVersion(ctx, {
      practicalId, unit, version: 1, text, uploadedAt, uploader, chem, dueAt: session.dueAt, seedNo: seed,
    })

    const reviewer = ctx.users.get(`${tas[unit.section]}@${DEMO_DOMAIN}`)!
    const reviewedAt = new Date(uploadedAt.getTime() + 26 * 3_600_000)
    // R1 is the most recent section: its clean runs still wait for review.
    if (key === 'R1:7') {
      await review(
        ctx, first, reviewer, reviewedAt, 'return',
        'Two peaks fall in one product window; re-integrate the 1,3-dichlorobutane region as one peak and upload again.',
      )
      const clean = simulatePeakTable({
        seed: seed + 1, windows: chem.windows, distribution: truth, areaNoise: 0.02,
        solvent: { retentionTime: 1.38, area: 2_400_000 }, startingMaterial: { retentionTime: 2.27, area: 410_000 },
        style: 'csv',
      }).text
      await storeVersion(ctx, {
        practicalId, unit, version: 2, text: clean, uploadedAt: new Date(reviewedAt.getTime() + 20 * 3_600_000),
        uploader, chem, dueAt: session.dueAt, seedNo: seed + 1,
      })
      continue
    }
    if (unit.section === 'R1' || first.attention > 0) continue
    // The TA takes the suggested accuracy score and docks a point here and there elsewhere.
    const suggested = startingScores(practical.rubric, {
      observed: first.factor,
      expected: chem.expected.factors[chem.keyFactor],
      tolerancePercent: practical.accuracyTolerancePercent,
    })
    const scores = Object.fromEntries(practical.rubric.map((c) => [
      c.key,
      c.kind === 'accuracy' ? suggested[c.key] ?? 0 : c.maxPoints - (seed % 2),
    ]))
    await review(ctx, first, reviewer, reviewedAt, 'accept', null, scores, seed % 3 === 0 ? 'Clean baseline and well-resolved peaks.' : '')
  }
}

interface Stored { id: number, attention: number, factor: number | null }

interface VersionToStore {
  practicalId: number
  unit: Unit
  version: number
  text: string
  uploadedAt: Date
  uploader: number
  chem: PracticalChemistry
  dueAt: Date
  seedNo: number
}

/**
 * The rows an upload of `text` writes (the file and its submission version, as
 * server/services/submissions/uploads.ts stores them), computed by the same engines; the caller
 * inserts them (one at a time for the demo, in batches for the department benchmark).
 */
export function versionRowsOf(v: Omit<VersionToStore, 'unit' | 'seedNo'> & { sectionId: number, unitKey: string, fileName: string }) {
  const run = evaluateRun({ text: v.text, ...v.chem })
  const bytes = Buffer.from(v.text, 'utf8')
  const sha256 = createHash('sha256').update(bytes).digest('hex')
  const file = {
    sha256, byteSize: bytes.length, mediaType: 'text/csv; profile=peak-table',
    originalName: v.fileName, content: bytes, uploadedBy: v.uploader, createdAt: v.uploadedAt,
  }
  const submission = {
    practicalId: v.practicalId,
    sectionId: v.sectionId,
    unitKey: v.unitKey,
    version: v.version,
    inputKind: run.kind,
    sha256,
    peaks: Buffer.from(packPeaks(run.peaks)),
    result: JSON.stringify(storedResultOf(run, v.chem.keyFactor)),
    flags: JSON.stringify(run.flags),
    attention: attentionOf(run.flags),
    factorSecondary: run.factors.secondaryToPrimary,
    factorTertiary: run.factors.tertiaryToPrimary,
    late: v.uploadedAt > v.dueAt,
    submittedBy: v.uploader,
    idempotencyKey: null,
    createdAt: v.uploadedAt,
    updatedAt: v.uploadedAt,
  }
  return { run, file, submission, factor: run.factors[v.chem.keyFactor] }
}

async function storeVersion(ctx: SeedContext, v: VersionToStore): Promise<Stored> {
  const rows = versionRowsOf({
    ...v,
    sectionId: v.unit.sectionId,
    unitKey: stationUnitKey(v.unit.sectionId, v.unit.station),
    fileName: `gc-${v.unit.section.toLowerCase()}-station${v.unit.station}-v${v.version}.csv`,
  })
  const file = await ctx.db.insertInto('files').values(rows.file).returning('id').executeTakeFirstOrThrow()
  const row = await ctx.db.insertInto('submissions').values({ ...rows.submission, fileId: file.id })
    .returning(['id', 'attention']).executeTakeFirstOrThrow()
  await ctx.db.insertInto('submissionMembers')
    .values(v.unit.members.map((userId) => ({ submissionId: row.id, userId })))
    .execute()
  return { id: row.id, attention: row.attention, factor: rows.factor }
}

async function review(
  ctx: SeedContext, s: Stored, reviewerId: number, at: Date,
  decision: 'accept' | 'return', reason: string | null, scores: Record<string, number> = {}, comment = '',
) {
  const total = Object.values(scores).reduce((a, b) => a + b, 0)
  await ctx.db.insertInto('reviews').values({
    submissionId: s.id, reviewerId, decision, reason, comment, scores: JSON.stringify(scores),
    total: decision === 'accept' ? total : null, createdAt: at,
  }).execute()
  await ctx.db.updateTable('submissions')
    .set({ status: decision === 'accept' ? 'accepted' : 'returned', updatedAt: at })
    .where('id', '=', s.id)
    .execute()
}
