// The bare servers the http case measures Halocline against: node:http and a pg Pool of the
// same size as the product's (10), each route answered the way a competent engineer would
// write it by hand: one SQL statement that reads the same rows and shapes them in PostgreSQL
// (json_agg), sent as it comes. They know the caller's id (no session to unseal: that cost is
// ours to pay) and keep the same scope in their where clauses.
import { createServer } from 'node:http'
import pg from 'pg'

/** The latest accepted-or-pending version of each unit (the class rule), as summary.mjs reads it. */
const LATEST = `select distinct on (s.unit_key) s.id, s.section_id, s.unit_key, s.status, s.factor_secondary, s.factor_tertiary,
    s.result -> 'molePercents' as mole_percents, s.excluded_at, s.exclusion_reason
  from submissions s where s.practical_id = $1 and s.status in ('pending', 'accepted')
  order by s.unit_key, s.version desc`

const SQL = {
  // GET /api/courses as an instructor: the owned courses.
  courses: `select coalesce(json_agg(x), '[]') as body from (select c.id, c.code, c.title, c.term
    from courses c join course_owners o on o.course_id = c.id where o.user_id = $1 order by c.term desc, c.code) x`,

  // GET /api/me/lab: each active enrolment with its course, section, TAs, partners, meetings, practicals.
  lab: `select json_build_object('enrollments', coalesce(json_agg(json_build_object(
      'course', json_build_object('id', c.id, 'code', c.code, 'title', c.title, 'term', c.term, 'timezone', c.timezone),
      'section', json_build_object('id', s.id, 'code', s.code, 'weekday', s.weekday, 'startTime', to_char(s.start_time, 'HH24:MI'),
        'endTime', to_char(s.end_time, 'HH24:MI'), 'room', s.room,
        'tas', (select coalesce(json_agg(u.name order by u.id), '[]') from section_tas t join users u on u.id = t.user_id
          where t.section_id = s.id)),
      'station', e.station, 'seat', e.seat,
      'partners', (select coalesce(json_agg(u.name order by m.seat, m.id), '[]') from enrollments m join users u on u.id = m.user_id
        where m.section_id = e.section_id and m.station = e.station and m.status = 'active' and m.user_id <> e.user_id),
      'meetings', (select coalesce(json_agg(json_build_object('date', d::date, 'start', (d::date + s.start_time) at time zone c.timezone,
          'end', (d::date + s.end_time) at time zone c.timezone) order by d), '[]')
        from generate_series(s.first_date + ((s.weekday - extract(isodow from s.first_date)::int + 7) % 7), s.last_date,
          interval '7 days') d
        where d::date <> all(s.skipped_dates)),
      'practicals', (select coalesce(json_agg(json_build_object('id', p.id, 'title', p.title, 'meetingDate', ps.meeting_date,
          'dueAt', ps.due_at, 'substrate', sb.name, 'method', m.name, 'reagent', m.reagent) order by ps.meeting_date), '[]')
        from practical_sessions ps join practicals p on p.id = ps.practical_id join substrates sb on sb.id = p.substrate_id
        join methods m on m.id = p.method_id where ps.section_id = s.id)
    ) order by s.weekday, s.start_time, s.code), '[]')) as body
    from enrollments e join sections s on s.id = e.section_id join courses c on c.id = s.course_id
    where e.user_id = $1 and e.status = 'active'`,

  // GET /api/practicals/:id as a student: the practical, its substrate, method, the student's
  // sessions, the substrate's windows and the items (with CAS numbers); nothing when not enrolled
  // where it runs.
  detail: `select json_build_object('id', p.id, 'title', p.title, 'workUnit', p.work_unit, 'notes', p.notes,
      'courseId', c.id, 'courseCode', c.code, 'timezone', c.timezone,
      'substrate', json_build_object('id', sb.id, 'name', sb.name, 'smiles', sb.smiles, 'molarMass', sb.molar_mass, 'density', sb.density),
      'method', json_build_object('id', m.id, 'name', m.name, 'reagent', m.reagent, 'halogen', m.halogen,
        'temperatureC', m.temperature_c, 'source', m.source),
      'sessions', (select json_agg(json_build_object('sectionId', s.id, 'sectionCode', s.code, 'meetingDate', ps.meeting_date,
          'start', (ps.meeting_date + s.start_time) at time zone c.timezone, 'end', (ps.meeting_date + s.end_time) at time zone c.timezone,
          'room', s.room, 'dueAt', ps.due_at) order by ps.meeting_date, ps.id)
        from practical_sessions ps join sections s on s.id = ps.section_id
        join enrollments e on e.section_id = s.id and e.user_id = $2 and e.status = 'active' where ps.practical_id = p.id),
      'windows', (select coalesce(json_agg(json_build_object('kind', w.kind, 'productSmiles', w.product_smiles, 'label', w.label,
          'rtMin', w.rt_min, 'rtMax', w.rt_max, 'responseFactor', w.response_factor) order by w.rt_min), '[]')
        from substrate_windows w where w.substrate_id = sb.id),
      'items', (select coalesce(json_agg(json_build_object('id', i.id, 'position', i.position, 'role', i.role, 'name', i.name,
          'smiles', i.smiles, 'molarMass', i.molar_mass, 'density', i.density, 'basis', i.basis, 'amount', i.amount,
          'casNumber', i.cas_number) order by i.position), '[]')
        from practical_items i where i.practical_id = p.id)
    ) as body
    from practicals p join courses c on c.id = p.course_id join substrates sb on sb.id = p.substrate_id join methods m on m.id = p.method_id
    where p.id = $1 and exists (select 1 from practical_sessions ps join enrollments e on e.section_id = ps.section_id
      where ps.practical_id = p.id and e.user_id = $2 and e.status = 'active')`,

  // GET /api/practicals/:id/queue as a TA: the latest version of each unit in the TA's sections
  // with its members and last acceptance, the sections, and the class's values for the outlier test.
  queue: `with latest as (select distinct on (unit_key) * from submissions where practical_id = $1 order by unit_key, version desc),
      mine as (select s.id, s.code from sections s join section_tas t on t.section_id = s.id and t.user_id = $2
        join practical_sessions ps on ps.section_id = s.id and ps.practical_id = $1)
    select json_build_object(
      'practical', (select json_build_object('id', p.id, 'title', p.title, 'course', json_build_object('id', c.id, 'code', c.code,
          'title', c.title, 'term', c.term), 'timezone', c.timezone, 'releasePolicy', c.release_policy,
          'resultsReleasedAt', p.results_released_at)
        from practicals p join courses c on c.id = p.course_id where p.id = $1),
      'sections', (select coalesce(json_agg(json_build_object('id', id, 'code', code) order by code), '[]') from mine),
      'rows', (select coalesce(json_agg(json_build_object('id', l.id, 'unitKey', l.unit_key, 'section', json_build_object('id', mine.id,
          'code', mine.code), 'version', l.version, 'submittedAt', l.created_at, 'late', l.late, 'status', l.status,
          'factorSecondary', l.factor_secondary, 'factorTertiary', l.factor_tertiary, 'flags', l.flags, 'excludedAt', l.excluded_at,
          'excludedBy', x.name, 'reason', l.exclusion_reason,
          'members', (select coalesce(json_agg(json_build_object('id', u.id, 'name', u.name, 'email', u.email, 'station', e.station)
              order by u.name, u.id), '[]')
            from submission_members sm join users u on u.id = sm.user_id
            left join enrollments e on e.user_id = sm.user_id and e.section_id = l.section_id where sm.submission_id = l.id),
          'lastAcceptTotal', (select r.total from reviews r where r.submission_id = l.id and r.decision = 'accept'
            order by r.created_at desc, r.id desc limit 1))
          order by l.attention desc, l.created_at, l.id), '[]')
        from latest l join mine on mine.id = l.section_id left join users x on x.id = l.excluded_by),
      'classValues', (select coalesce(json_agg(json_build_array(id, factor_secondary, factor_tertiary)), '[]') from latest
        where status in ('pending', 'accepted') and excluded_at is null)
    ) as body`,

  // GET /api/practicals/:id/summary as the instructor: the class's latest results and the sections.
  summary: `select json_build_object(
      'rows', (select coalesce(json_agg(l), '[]') from (${LATEST.replaceAll('$1', 'p.id')}) l),
      'sections', (select coalesce(json_agg(json_build_object('id', s.id, 'code', s.code) order by s.code), '[]')
        from practical_sessions ps join sections s on s.id = ps.section_id where ps.practical_id = p.id)
    ) as body
    from practicals p join course_owners o on o.course_id = p.course_id and o.user_id = $2 where p.id = $1`,

  // GET /api/stockroom/forecast as the coordinator: the meetings in range with their section and
  // enrolment, the practicals' items with the reagent links the coordinator dismissed, the
  // catalog, the lots with what remains, the settings.
  forecast: `select json_build_object(
      'sessions', (select coalesce(json_agg(json_build_object('practicalId', ps.practical_id, 'sectionId', s.id, 'sectionCode', s.code,
          'meetingDate', ps.meeting_date, 'weekday', s.weekday, 'firstDate', s.first_date, 'lastDate', s.last_date,
          'skippedDates', s.skipped_dates, 'studentsPerStation', s.students_per_station,
          'stations', (select json_agg(e.station) from enrollments e where e.section_id = s.id and e.status = 'active'))), '[]')
        from practical_sessions ps join sections s on s.id = ps.section_id where ps.meeting_date between $1 and $2),
      'practicals', (select coalesce(json_agg(json_build_object('id', p.id, 'title', p.title, 'courseId', p.course_id, 'courseCode', c.code,
          'workUnit', p.work_unit, 'items', (select coalesce(json_agg(json_build_object('item', i, 'dismissed',
              array(select d.reagent_id from item_link_dismissals d where d.practical_item_id = i.id)) order by i.position), '[]')
            from practical_items i where i.practical_id = p.id))), '[]')
        from practicals p join courses c on c.id = p.course_id
        where exists (select 1 from practical_sessions ps where ps.practical_id = p.id and ps.meeting_date between $1 and $2)),
      'reagents', (select coalesce(json_agg(r), '[]') from reagents r),
      'lots', (select coalesce(json_agg(json_build_object('id', l.id, 'reagentId', l.reagent_id, 'unit', l.unit, 'expiresOn', l.expires_on,
          'remaining', l.quantity - coalesce((select sum(u.amount) from reagent_usage u where u.lot_id = l.id), 0))), '[]')
        from reagent_lots l),
      'rinseMlPerUnit', coalesce((select rinse_ml_per_unit from stockroom_settings where id = 1), 10)
    ) as body`,
}

/**
 * One bare server per route kind. `routes` maps a path to [statement key, parameters] or to a
 * fixed body (routes that read nothing answer the same bytes as ours).
 */
export function startBareServer(databaseUrl, routes) {
  // json comes back as its text: it is sent as PostgreSQL wrote it, never parsed and written again.
  const types = { getTypeParser: (oid, format) => (oid === 114 ? (v) => v : pg.types.getTypeParser(oid, format)) }
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 10, types })
  const server = createServer(async (req, res) => {
    const route = routes[req.url]
    try {
      let body
      if (typeof route === 'string') body = route
      else if (route) body = (await pool.query(SQL[route[0]], route[1])).rows[0]?.body
      if (body === undefined) {
        res.writeHead(404).end()
        return
      }
      res.writeHead(200, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) })
      res.end(body)
    } catch (error) {
      res.writeHead(500).end(String(error))
    }
  })
  return new Promise((resolve) => server.listen(0, '127.0.0.1', () => resolve({
    url: `http://127.0.0.1:${server.address().port}`,
    close: async () => {
      server.close()
      await pool.end()
    },
  })))
}
