import type { PracticalScope } from '../../utils/access'
import type { ResultsPracticalDetail } from '#shared/types/results'
import { stationOfUnitKey } from '../submissions/work-units'
import { useDb } from '../../utils/db'
import { sql } from 'kysely'

/**
 * What the class results page shows beside the summary: the practical, the course's outlier
 * settings, the caller's sections, and who is behind each result in those sections only.
 */
export async function resultsPracticalDetail(scope: PracticalScope): Promise<ResultsPracticalDetail> {
  const id = scope.practical.id
  const db = useDb()
  const visible = scope.sessionSectionIds.length ? scope.sessionSectionIds : [-1]
  // Three independent reads side by side. The people come with each result in the same
  // statement: a department's class is thousands of results, too many to send back as a list of ids.
  const [facts, sections, submissions] = await Promise.all([
    db.selectFrom('substrates').innerJoin('methods', (j) => j.on('methods.id', '=', scope.practical.methodId))
      .select([
        'substrates.name', 'substrates.smiles', 'methods.name as methodName', 'methods.reagent', 'methods.temperatureC', 'methods.source',
      ])
      .where('substrates.id', '=', scope.practical.substrateId).executeTakeFirstOrThrow(),
    db.selectFrom('practicalSessions').innerJoin('sections', 'sections.id', 'practicalSessions.sectionId')
      .select(['sections.id', 'sections.code', 'practicalSessions.meetingDate'])
      .where('practicalSessions.practicalId', '=', id).where('sections.id', 'in', visible).orderBy('sections.code').execute(),
    db.selectFrom('submissions').innerJoin('sections', 'sections.id', 'submissions.sectionId')
      .select(['submissions.id', 'submissions.unitKey', 'sections.code',
        sql<string[]>`coalesce((select json_agg(u.name order by u.name, u.id) from submission_members sm
          join users u on u.id = sm.user_id where sm.submission_id = submissions.id), '[]')`.as('names')])
      .where('submissions.practicalId', '=', id).where('submissions.sectionId', 'in', visible)
      .where('submissions.status', 'in', ['pending', 'accepted']).execute(),
  ])
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
      label: s.names.join(' & ') || s.unitKey,
    })),
    canSendDigests: scope.role === 'owner',
  }
}
