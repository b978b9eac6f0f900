import { sql } from 'kysely'
import type { MyLab } from '#shared/types/section'
import type { MethodReagent, Section } from '../../database/schema'
import { useDb } from '../../utils/db'
import { meetingsOf } from './section-rows'

// A student's own lab in one query: each active enrolment with its course, section, the
// section's TAs, the partners at the same station (seat order) and the practicals that run
// in it (meeting order). Meetings come from the timetable (meetingsOf, remembered per timetable).

interface LabRow {
  station: number | null
  seat: number | null
  course: MyLab['enrollments'][number]['course']
  section: Pick<Section, 'id' | 'code' | 'weekday' | 'startTime' | 'endTime' | 'room' | 'firstDate' | 'lastDate' | 'skippedDates'> & {
    tas: string[]
  }
  partners: string[]
  practicals: Array<Omit<MyLab['enrollments'][number]['practicals'][number], 'reagent'> & { reagent: MethodReagent }>
}

export async function studentLab(userId: number): Promise<MyLab> {
  const { rows } = await sql<LabRow>`select e.station, e.seat,
      json_build_object('id', c.id, 'code', c.code, 'title', c.title, 'term', c.term, 'timezone', c.timezone) as course,
      json_build_object('id', s.id, 'code', s.code, 'weekday', s.weekday, 'startTime', s.start_time, 'endTime', s.end_time,
        'room', s.room, 'firstDate', s.first_date, 'lastDate', s.last_date, 'skippedDates', s.skipped_dates,
        'tas', array(select u.name from section_tas t join users u on u.id = t.user_id where t.section_id = s.id order by t.user_id)
      ) as section,
      array(select u.name from enrollments m join users u on u.id = m.user_id
        where m.section_id = e.section_id and m.station = e.station and m.status = 'active' and m.user_id <> e.user_id
        order by m.seat, m.id) as partners,
      coalesce((select json_agg(json_build_object('id', p.id, 'title', p.title, 'meetingDate', ps.meeting_date, 'dueAt', ps.due_at,
          'substrate', sb.name, 'method', m.name, 'reagent', m.reagent) order by ps.meeting_date, ps.id)
        from practical_sessions ps join practicals p on p.id = ps.practical_id join substrates sb on sb.id = p.substrate_id
        join methods m on m.id = p.method_id where ps.section_id = s.id), '[]') as practicals
    from enrollments e join sections s on s.id = e.section_id join courses c on c.id = s.course_id
    where e.user_id = ${userId} and e.status = 'active' order by e.id`.execute(useDb())
  return {
    enrollments: rows.map((r) => {
      const { firstDate, lastDate, skippedDates, tas, ...section } = r.section
      return {
        course: r.course,
        section: { ...section, startTime: section.startTime.slice(0, 5), endTime: section.endTime.slice(0, 5), tas },
        station: r.station,
        seat: r.seat,
        partners: r.partners,
        meetings: meetingsOf({ ...section, firstDate, lastDate, skippedDates: [...skippedDates].sort(), timezone: r.course.timezone }),
        practicals: r.practicals.map((p) => ({ ...p, dueAt: new Date(p.dueAt).toISOString() })),
      }
    }),
  }
}
