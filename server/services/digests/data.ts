import type { PracticalScope } from '../../utils/access'
import type { StoredFlag, SubmissionStatus } from '../../database/schema'
import type { DigestRecipient, PendingReview, ResultsKeyFactor } from '#shared/types/results'
import type { FactorStats } from '#shared/types/summary'
import { stationOfUnitKey, unitKeyOf } from '../submissions/work-units'
import { keyFactorValue } from '#shared/utils/key-factor'
import { createError } from 'h3'
import { latestClassResults } from '../results/latest-versions'
import { practicalSummary } from '../results/summary'
import { practicalChemistry } from '../submissions/practical-chemistry'
import { useDb } from '../../utils/db'

export interface DigestPerson { id: number, name: string, email: string }

export interface DigestVersion {
  submissionId: number
  version: number
  status: SubmissionStatus
  factor: number | null
  molePercents: Array<{ smiles: string, percent: number }>
  flags: StoredFlag[]
  late: boolean
  /** Set (possibly empty) when a reviewer left this version out of the class figures. */
  exclusionReason: string | null
}

/** One work unit of the section: its newest version of any status, or none yet. */
export interface DigestUnit {
  unitKey: string
  station: number | null
  members: DigestPerson[]
  /** The newest version, whatever its status (what a TA sees first). */
  latest: DigestVersion | null
  /** The version the class figures count (newest accepted-or-pending), if any. */
  counted: DigestVersion | null
  /** The class's outlier test flags the counted version (step: the generalized ESD's). */
  outlier: { statistic: number, critical: number, step?: number } | null
}

/** Everything a digest template needs, read once per section: templates stay pure. */
export interface DigestContext {
  course: { id: number, code: string, title: string, term: string }
  practical: { id: number, title: string, workUnit: 'student' | 'pair' }
  section: { id: number, code: string, meetingDate: string | null }
  substrateName: string
  methodName: string
  keyFactor: ResultsKeyFactor
  literature: number | null
  /** Whence the literature value, as a reference. */
  literatureSource: string | null
  products: Array<{ smiles: string, label: string, name: string | null }>
  /** Class mean mole % per product (included results). */
  classMolePercents: Array<{ smiles: string, percent: number | null }>
  classStats: FactorStats | null
  sectionStats: FactorStats | null
  excludedCount: number
  /** Runs the class figures count (each unit's newest accepted-or-pending, not excluded). */
  countedRuns: number
  /** Of those, the ones no reviewer has decided on yet, class-wide (the message is the same whoever previews it). */
  countedPending: number
  /** The same runs per section, in the sections the caller sees: the warning before sending. */
  pendingReview: PendingReview
  units: DigestUnit[]
  recipients: DigestRecipient[]
}

/** Names and station of the people behind some submissions (for staff views only). */
export async function digestUnitMembers(submissionIds: number[]): Promise<Map<number, DigestPerson[]>> {
  const map = new Map<number, DigestPerson[]>()
  if (!submissionIds.length) return map
  const rows = await useDb().selectFrom('submissionMembers').innerJoin('users', 'users.id', 'submissionMembers.userId')
    .select(['submissionMembers.submissionId', 'users.id', 'users.name', 'users.email'])
    .where('submissionMembers.submissionId', 'in', submissionIds).orderBy('users.name').orderBy('users.id').execute()
  for (const r of rows) map.set(r.submissionId, [...(map.get(r.submissionId) ?? []), { id: r.id, name: r.name, email: r.email }])
  return map
}

async function digestVersions(ids: number[], keyFactor: ResultsKeyFactor): Promise<Map<number, DigestVersion>> {
  if (!ids.length) return new Map()
  const rows = await useDb().selectFrom('submissions')
    .select(['id', 'version', 'status', 'factorSecondary', 'factorTertiary', 'result', 'flags', 'late', 'excludedAt', 'exclusionReason'])
    .where('id', 'in', [...new Set(ids)]).execute()
  return new Map(rows.map((s) => [s.id, {
    submissionId: s.id,
    version: s.version,
    status: s.status,
    factor: keyFactorValue(s, keyFactor),
    molePercents: (s.result as { molePercents?: DigestVersion['molePercents'] }).molePercents ?? [],
    flags: s.flags,
    late: s.late,
    exclusionReason: s.excludedAt ? (s.exclusionReason ?? '') : null,
  }]))
}

async function digestRecipients(scope: PracticalScope, sectionId: number): Promise<DigestRecipient[]> {
  const db = useDb()
  const students = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['users.id', 'users.name', 'users.email']).where('enrollments.sectionId', '=', sectionId)
    .where('enrollments.status', '=', 'active').where('users.disabledAt', 'is', null).orderBy('users.name').orderBy('users.id').execute()
  const staff = await db.selectFrom('users').select(['users.id', 'users.name', 'users.email']).where('users.disabledAt', 'is', null)
    .where((eb) => eb.or([
      eb('users.id', 'in', eb.selectFrom('sectionTas').select('userId').where('sectionId', '=', sectionId)),
      eb('users.id', 'in', eb.selectFrom('courseOwners').select('userId').where('courseId', '=', scope.course.id)),
    ])).orderBy('users.name').orderBy('users.id').execute()
  return [
    ...students.map((u) => ({ userId: u.id, name: u.name, email: u.email, audience: 'student' as const })),
    ...staff.map((u) => ({ userId: u.id, name: u.name, email: u.email, audience: 'staff' as const })),
  ]
}

/** The section's units: enrolled students grouped as the practical counts them, plus any past uploader. */
async function digestUnits(
  scope: PracticalScope, sectionId: number, stats: FactorStats | null, keyFactor: ResultsKeyFactor,
): Promise<DigestUnit[]> {
  const db = useDb()
  const enrolled = await db.selectFrom('enrollments').innerJoin('users', 'users.id', 'enrollments.userId')
    .select(['users.id', 'users.name', 'users.email', 'enrollments.station']).where('enrollments.sectionId', '=', sectionId)
    .where('enrollments.status', '=', 'active').orderBy('enrollments.station').orderBy('users.name').execute()
  const newest = await db.selectFrom('submissions').distinctOn('unitKey').select(['id', 'unitKey'])
    .where('practicalId', '=', scope.practical.id).where('sectionId', '=', sectionId)
    .orderBy('unitKey').orderBy('version', 'desc').execute()
  const counted = (await latestClassResults(scope.practical.id)).filter((r) => r.sectionId === sectionId)
  const versions = await digestVersions([...newest.map((s) => s.id), ...counted.map((c) => c.submissionId)], keyFactor)
  const members = await digestUnitMembers(newest.map((s) => s.id))
  const flagged = new Map((stats?.outliers ?? []).map((o) => [o.submissionId, o]))

  const units = new Map<string, DigestUnit>()
  const unitOf = (key: string, station: number | null): DigestUnit => {
    let unit = units.get(key)
    if (!unit) units.set(key, unit = { unitKey: key, station, members: [], latest: null, counted: null, outlier: null })
    return unit
  }
  for (const e of enrolled) {
    const key = unitKeyOf(scope.practical.workUnit, { userId: e.id, sectionId, station: e.station })
    unitOf(key, e.station).members.push({ id: e.id, name: e.name, email: e.email })
  }
  for (const s of newest) {
    const unit = unitOf(s.unitKey, stationOfUnitKey(s.unitKey))
    if (!unit.members.length) unit.members = members.get(s.id) ?? []
    unit.latest = versions.get(s.id) ?? null
  }
  for (const c of counted) {
    const unit = units.get(c.unitKey)
    if (!unit) continue
    unit.counted = versions.get(c.submissionId) ?? null
    const o = flagged.get(c.submissionId)
    unit.outlier = o ? { statistic: o.statistic, critical: o.critical, ...(o.step ? { step: o.step } : {}) } : null
  }
  return [...units.values()].sort((a, b) => (a.station ?? 1e9) - (b.station ?? 1e9)
    || (a.members[0]?.name ?? '').localeCompare(b.members[0]?.name ?? '') || a.unitKey.localeCompare(b.unitKey))
}

/** Counted runs still waiting for review: class-wide, and per section the caller sees (sections with none left out). */
export async function pendingReviewOf(scope: PracticalScope): Promise<{ classWide: number, visible: PendingReview }> {
  const classWide = (await latestClassResults(scope.practical.id)).filter((r) => r.status === 'pending' && !r.excludedAt)
  const waiting = classWide.filter((r) => scope.sessionSectionIds.includes(r.sectionId))
  const perSection = new Map<number, number>()
  for (const r of waiting) perSection.set(r.sectionId, (perSection.get(r.sectionId) ?? 0) + 1)
  const codes = perSection.size
    ? await useDb().selectFrom('sections').select(['id', 'code']).where('id', 'in', [...perSection.keys()]).orderBy('code').execute()
    : []
  const sections = codes.map((c) => ({ sectionId: c.id, code: c.code, count: perSection.get(c.id)! }))
  return { classWide: classWide.length, visible: { total: waiting.length, sections } }
}

/** A section's digest data, for a section of this practical the caller may see; else 404. */
export async function loadDigestContext(scope: PracticalScope, sectionId: number): Promise<DigestContext> {
  if (!scope.sessionSectionIds.includes(sectionId)) throw createError({ statusCode: 404, statusMessage: 'Section not found' })
  const db = useDb()
  const section = await db.selectFrom('sections').innerJoin('practicalSessions', 'practicalSessions.sectionId', 'sections.id')
    .select(['sections.id', 'sections.code', 'practicalSessions.meetingDate'])
    .where('sections.id', '=', sectionId).where('practicalSessions.practicalId', '=', scope.practical.id).executeTakeFirstOrThrow()
  const names = await db.selectFrom('substrates').innerJoin('methods', (j) => j.on('methods.id', '=', scope.practical.methodId))
    .select(['substrates.name as substrate', 'methods.name as method'])
    .where('substrates.id', '=', scope.practical.substrateId).executeTakeFirstOrThrow()
  const chemistry = await practicalChemistry(scope.practical)
  // The official figures: the course's own test, nothing left out but what a reviewer excluded.
  const summary = await practicalSummary(scope, {})
  const key = summary.keyFactor
  const classStats = summary.factors[key]
  const pending = await pendingReviewOf(scope)
  const sectionStats = summary.bySection.find((b) => b.sectionId === sectionId)?.factors[key] ?? null
  return {
    course: { id: scope.course.id, code: scope.course.code, title: scope.course.title, term: scope.course.term },
    practical: { id: scope.practical.id, title: scope.practical.title, workUnit: scope.practical.workUnit },
    section: { id: section.id, code: section.code, meetingDate: section.meetingDate },
    substrateName: names.substrate,
    methodName: names.method,
    keyFactor: key,
    literature: summary.literature[key],
    literatureSource: summary.literatureSource,
    products: chemistry.products.map((p) => ({ smiles: p.smiles, label: p.label, name: p.name })),
    classMolePercents: summary.distribution.map((d) => ({ smiles: d.smiles, percent: d.observed })),
    classStats,
    sectionStats,
    excludedCount: summary.excluded.length,
    countedRuns: classStats?.n ?? 0,
    countedPending: pending.classWide,
    pendingReview: pending.visible,
    units: await digestUnits(scope, sectionId, classStats, key),
    recipients: await digestRecipients(scope, sectionId),
  }
}
