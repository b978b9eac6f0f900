import type { PracticalScope } from '../../utils/access'
import type { ResultsPracticalDetail } from '#shared/types/results'
import { stationOfUnitKey } from '../submissions/work-units'
import { digestUnitMembers } from '../digests/data'
import { useDb } from '../../utils/db'

/**
 * What the class results page shows beside the summary: the practical, the course's outlier
 * settings, the caller's sections, and who is behind each result in those sections only.
 */
export async function resultsPracticalDetail(scope: PracticalScope): Promise<ResultsPracticalDetail> {
  const id = scope.practical.id
  const db = useDb()
  const facts = await db.selectFrom('substrates').innerJoin('methods', (j) => j.on('methods.id', '=', scope.practical.methodId))
    .select([
      'substrates.name', 'substrates.smiles', 'methods.name as methodName', 'methods.reagent', 'methods.temperatureC', 'methods.source',
    ])
    .where('substrates.id', '=', scope.practical.substrateId).executeTakeFirstOrThrow()
  const visible = scope.sessionSectionIds.length ? scope.sessionSectionIds : [-1]
  const sections = await db.selectFrom('practicalSessions').innerJoin('sections', 'sections.id', 'practicalSessions.sectionId')
    .select(['sections.id', 'sections.code', 'practicalSessions.meetingDate'])
    .where('practicalSessions.practicalId', '=', id).where('sections.id', 'in', visible).orderBy('sections.code').execute()
  const submissions = await db.selectFrom('submissions').innerJoin('sections', 'sections.id', 'submissions.sectionId')
    .select(['submissions.id', 'submissions.unitKey', 'sections.code'])
    .where('submissions.practicalId', '=', id).where('submissions.sectionId', 'in', visible)
    .where('submissions.status', 'in', ['pending', 'accepted']).execute()
  const members = await digestUnitMembers(submissions.map((s) => s.id))
  return {
    practicalId: id,
    title: scope.practical.title,
    courseId: scope.course.id,
    courseCode: scope.course.code,
    term: scope.course.term,
    substrate: { name: facts.name, smiles: facts.smiles },
    method: { name: facts.methodName, reagent: facts.reagent, temperatureC: facts.temperatureC, source: facts.source },
    role: scope.role === 'owner' ? 'owner' : 'ta',
    outlier: { test: scope.course.outlierTest, alpha: scope.course.outlierAlpha, zscoreLimit: scope.course.zscoreLimit },
    sections: sections.map((s) => ({ id: s.id, code: s.code, meetingDate: s.meetingDate })),
    units: submissions.map((s) => ({
      submissionId: s.id, sectionCode: s.code, station: stationOfUnitKey(s.unitKey),
      label: (members.get(s.id) ?? []).map((m) => m.name).join(' & ') || s.unitKey,
    })),
    canSendDigests: scope.role === 'owner',
  }
}
