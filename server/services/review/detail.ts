import type { ReviewerScope } from './scope'
import type { StoredFlag, Submission } from '../../database/schema'
import type { StoredResult } from '#shared/types/submission'
import { unpackPeaks } from '#shared/utils/lib/stored-peaks'
import type { AccuracySuggestionView, ReviewView, SubmissionDetail, VersionDiff } from '#shared/types/review'
import { defaultResubmitDue } from '#shared/utils/resubmit'
import { suggestAccuracyPoints } from '#shared/utils/grading'
import { keyFactorValue } from '#shared/utils/key-factor'
import { flagsWithOutlier, nextPendingAfter, queuePracticalOf, reviewQueueOrder, unitViewsOf } from './queue'
import { reviewSectionIds } from './scope'
import { diffVersions } from './version-diff'
import { practicalChemistry, referenceShare } from '../submissions/practical-chemistry'
import { useDb } from '../../utils/db'
import { invalid } from '../../utils/validation'

// Everything a reviewer looks at for one submission: the peaks and result, flags (with the
// class outlier test), the three distributions, every version of the work unit and a diff,
// the reviews so far, the rubric with the suggested accuracy score, and where the queue goes next.

async function unitVersions(scope: ReviewerScope, submission: Submission) {
  const sections = reviewSectionIds(scope)
  let query = useDb().selectFrom('submissions').innerJoin('files', 'files.id', 'submissions.fileId')
    .select(['submissions.id', 'submissions.version', 'submissions.createdAt', 'submissions.status', 'submissions.factorSecondary',
      'submissions.factorTertiary', 'submissions.late', 'submissions.excludedAt', 'submissions.peaks', 'submissions.result',
      'submissions.flags', 'files.originalName'])
    .where('submissions.practicalId', '=', submission.practicalId).where('submissions.unitKey', '=', submission.unitKey)
  if (sections) query = query.where('submissions.sectionId', 'in', sections.length ? sections : [-1])
  return query.orderBy('submissions.version').execute()
}

type VersionRow = Awaited<ReturnType<typeof unitVersions>>[number]

/** Default: the previous version against this one; ?compare= picks the other side. Older one first. */
function chosenDiff(
  versions: VersionRow[], current: VersionRow, compareId: number | undefined, labels: Map<string, string>,
): VersionDiff | null {
  let other: VersionRow | undefined
  if (compareId !== undefined) {
    other = versions.find((v) => v.id === compareId)
    if (!other) invalid([{ field: 'compare', message: 'Not a version of this work unit' }])
    if (other.id === current.id) invalid([{ field: 'compare', message: 'Choose another version to compare with' }])
  } else {
    other = [...versions].reverse().find((v) => v.version < current.version)
  }
  if (!other) return null
  const [from, to] = other.version < current.version ? [other, current] : [current, other]
  const side = (v: VersionRow) => ({
    id: v.id, version: v.version, peaks: unpackPeaks(v.peaks), result: v.result as StoredResult, flags: v.flags as StoredFlag[],
  })
  return diffVersions(side(from), side(to), labels)
}

async function unitReviews(versionIds: number[]): Promise<ReviewView[]> {
  if (!versionIds.length) return []
  const rows = await useDb().selectFrom('reviews').innerJoin('users', 'users.id', 'reviews.reviewerId')
    .innerJoin('submissions', 'submissions.id', 'reviews.submissionId')
    .select(['reviews.id', 'reviews.submissionId', 'submissions.version', 'users.name', 'reviews.createdAt', 'reviews.decision',
      'reviews.reason', 'reviews.comment', 'reviews.scores', 'reviews.total', 'reviews.resubmitDueAt'])
    .where('reviews.submissionId', 'in', versionIds).orderBy('reviews.createdAt', 'desc').orderBy('reviews.id', 'desc').execute()
  return rows.map((r) => ({
    id: r.id, submissionId: r.submissionId, version: r.version, reviewer: r.name, createdAt: r.createdAt.toISOString(),
    decision: r.decision, reason: r.reason, comment: r.comment, scores: r.scores as Record<string, number>, total: r.total,
    resubmitDueAt: r.resubmitDueAt?.toISOString() ?? null,
  }))
}

export function accuracySuggestionFor(
  scope: ReviewerScope, observed: number | null, expected: number | null, comparedWith: string,
): AccuracySuggestionView {
  const tolerancePercent = scope.course.accuracyTolerancePercent
  const scores: Record<string, number> = {}
  for (const c of scope.course.rubric.filter((r) => r.kind === 'accuracy')) {
    const points = suggestAccuracyPoints(c, { observed, expected, tolerancePercent })
    if (points !== null) scores[c.key] = points
  }
  const deviationPercent = observed !== null && expected ? (Math.abs(observed - expected) / expected) * 100 : null
  return { tolerancePercent, observed, expected, comparedWith, deviationPercent, scores }
}

type Chemistry = Awaited<ReturnType<typeof practicalChemistry>>

/** Each product's share in this run beside the statistical, predicted and reference shares. */
function detailDistribution(chemistry: Chemistry, result: StoredResult): SubmissionDetail['distribution'] {
  return chemistry.products.map((p) => ({
    smiles: p.smiles, label: p.label, name: p.name, carbonClass: p.carbonClass, hydrogens: p.hydrogens,
    observed: result.molePercents.find((m) => m.smiles === p.smiles)?.percent ?? null,
    statistical: chemistry.statistical.find((m) => m.smiles === p.smiles)?.percent ?? 0,
    predicted: chemistry.predicted.find((m) => m.smiles === p.smiles)?.percent ?? 0,
    reference: referenceShare(chemistry, p.smiles),
  }))
}

/** The solvent and starting-material windows the trace is drawn with. */
function referenceWindowsOf(chemistry: Chemistry): SubmissionDetail['referenceWindows'] {
  const { solvent, startingMaterial } = chemistry
  return [
    ...(solvent ? [{ kind: 'solvent' as const, rtMin: solvent.rtMin, rtMax: solvent.rtMax }] : []),
    ...(startingMaterial ? [{ kind: 'starting-material' as const, rtMin: startingMaterial.rtMin, rtMax: startingMaterial.rtMax }] : []),
  ]
}

/** The substrate and method names, the section, and who uploaded and who excluded the run. */
async function detailFacts(scope: ReviewerScope, submission: Submission) {
  const db = useDb()
  const [names, section, people] = await Promise.all([
    db.selectFrom('practicals').innerJoin('substrates', 'substrates.id', 'practicals.substrateId')
      .innerJoin('methods', 'methods.id', 'practicals.methodId')
      .select(['substrates.name as substrateName', 'substrates.smiles', 'methods.name as methodName', 'methods.reagent'])
      .where('practicals.id', '=', scope.practical.id).executeTakeFirstOrThrow(),
    db.selectFrom('sections').select(['id', 'code']).where('id', '=', submission.sectionId).executeTakeFirstOrThrow(),
    db.selectFrom('users').select(['id', 'name'])
      .where('id', 'in', [submission.submittedBy, submission.excludedBy ?? submission.submittedBy]).execute(),
  ])
  const nameOf = (id: number | null) => people.find((p) => p.id === id)?.name ?? null
  return { names, section, nameOf }
}

export async function buildSubmissionDetail(scope: ReviewerScope, submission: Submission, compareId?: number): Promise<SubmissionDetail> {
  const chemistry = await practicalChemistry(scope.practical)
  const key = chemistry.keyFactor
  const [versions, queue, units, { names, section, nameOf }] = await Promise.all([
    unitVersions(scope, submission),
    // Where the queue goes next: its order and counts only, not its people and reviews.
    reviewQueueOrder(scope, key),
    unitViewsOf([submission]),
    detailFacts(scope, submission),
  ])
  const current = versions.find((v) => v.id === submission.id)!
  const labels = new Map(chemistry.products.map((p) => [p.smiles, p.label]))
  const result = submission.result as StoredResult
  const { flags, attention } = flagsWithOutlier(submission.flags as StoredFlag[], submission.id, queue.outliers, key)
  const latest = versions.at(-1)!
  const observed = keyFactorValue(submission, key)
  const excludedAt = submission.excludedAt
  return {
    id: submission.id,
    version: submission.version,
    latestId: latest.id,
    isLatest: latest.id === submission.id,
    status: submission.status,
    submittedAt: submission.createdAt.toISOString(),
    submittedBy: nameOf(submission.submittedBy) ?? '',
    late: submission.late,
    kind: submission.inputKind,
    fileName: current.originalName,
    practical: {
      ...queuePracticalOf(scope, chemistry),
      substrate: { name: names.substrateName, smiles: names.smiles },
      method: { name: names.methodName, reagent: names.reagent },
    },
    unit: units.get(submission.id)!,
    section,
    peaks: unpackPeaks(submission.peaks),
    result,
    keyFactor: observed,
    flags,
    attention,
    outliers: queue.outliers.run,
    distribution: detailDistribution(chemistry, result),
    windows: chemistry.windows.map((w) => ({ productSmiles: w.productSmiles, rtMin: w.rtMin, rtMax: w.rtMax })),
    referenceWindows: referenceWindowsOf(chemistry),
    versions: versions.map((v) => ({
      id: v.id, version: v.version, submittedAt: v.createdAt.toISOString(), fileName: v.originalName, status: v.status,
      keyFactor: keyFactorValue(v, key), late: v.late, excluded: v.excludedAt !== null,
    })),
    diff: chosenDiff(versions, current, compareId, labels),
    reviews: await unitReviews(versions.map((v) => v.id)),
    rubric: scope.course.rubric,
    suggestion: accuracySuggestionFor(scope, observed, chemistry.expected.factors[key], chemistry.expected.description),
    excluded: excludedAt
      ? { at: excludedAt.toISOString(), by: nameOf(submission.excludedBy), reason: submission.exclusionReason ?? '' }
      : null,
    nextPendingId: nextPendingAfter(queue.rows, submission.id),
    pendingCount: queue.rows.filter((r) => r.status === 'pending').length,
    resubmit: {
      days: scope.course.resubmitDays,
      defaultDueAt: defaultResubmitDue(new Date(), scope.course.resubmitDays, scope.course.timezone).toISOString(),
    },
  }
}
