// GET /api/practicals/:id/summary with 2,000 and 20,000 submissions in the database, against
// the raw SQL that reads the same rows, side by side; and how each grows from 2,000 to 20,000.
// The route remembers its answer until a result changes (server/services/results/summary.ts):
// the first answer and the answer right after a change are timed too.
import pg from 'pg'
import { signIn } from '../lib/world.mjs'

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

const RAW = `select distinct on (s.unit_key) s.id, s.section_id, s.unit_key, s.factor_secondary, s.factor_tertiary,
  s.result -> 'molePercents' as mole_percents, s.excluded_at, s.exclusion_reason
  from submissions s where s.practical_id = $1 and s.status in ('pending', 'accepted')
  order by s.unit_key, s.version desc`

/** A practical of its own with n units' results (and a superseded version for a tenth of them). */
export async function fill(client, n) {
  const { rows: [base] } = await client.query(`select p.course_id, p.substrate_id, p.method_id, (select id from files limit 1) as file_id,
    (select id from users where role = 'student' limit 1) as user_id from practicals p where p.title like 'Chlorination%' limit 1`)
  const { rows: sections } = await client.query('select id from sections where course_id = $1 order by id', [base.course_id])
  const { rows: [p] } = await client.query(`insert into practicals (course_id, title, substrate_id, method_id, work_unit)
    values ($1, $2, $3, $4, 'student') returning id`, [base.course_id, `Bench practical ${n}`, base.substrate_id, base.method_id])
  for (const s of sections) {
    await client.query(
      `insert into practical_sessions (practical_id, section_id, meeting_date, due_at) values ($1, $2, current_date, now())`,
      [p.id, s.id],
    )
  }
  const sectionIds = sections.map((s) => s.id)
  await client.query(`insert into submissions (practical_id, section_id, unit_key, version, file_id, input_kind, sha256,
      result, flags, factor_secondary, status, submitted_by)
    select $1, ($2::int[])[1 + (g % array_length($2::int[], 1))], 'bench:' || g, v, $3, 'peak-table', md5(g::text || v::text),
      jsonb_build_object('molePercents', jsonb_build_array(jsonb_build_object('smiles', 'ClCCCCCl', 'percent', 20 + (g % 7)))),
      '[]'::jsonb, 2.5 + ((g * 7919) % 1000) / 1000.0, case when v = 1 and g % 10 = 0 then 'returned' else 'accepted' end, $4
    from generate_series(1, $5) g cross join lateral (select 1 as v union all select 2 where g % 10 = 0) versions`,
  [p.id, sectionIds, base.file_id, base.user_id, n])
  await client.query('analyze submissions')
  return p.id
}

async function timeRoute(baseUrl, cookie, practicalId, repeats) {
  const times = []
  for (let i = 0; i < repeats; i++) {
    const t = performance.now()
    const response = await fetch(`${baseUrl}/api/practicals/${practicalId}/summary`, { headers: { cookie } })
    const body = await response.json()
    times.push(performance.now() - t)
    if (response.status !== 200 || !(body.n > 0)) throw new Error(`summary ${practicalId}: ${response.status}`)
  }
  return median(times)
}

/**
 * The route right after a result changed (a reviewer's decision, written as an update of one
 * row): nothing remembered applies, so the class is read and its figures computed again.
 */
async function timeAfterChange(baseUrl, cookie, client, practicalId, repeats) {
  const times = []
  for (let i = 0; i < repeats; i++) {
    await client.query(`update submissions set status = status where id = (select min(id) + $2 from submissions
      where practical_id = $1 and status = 'accepted')`, [practicalId, i])
    times.push(await timeRoute(baseUrl, cookie, practicalId, 1))
  }
  return median(times)
}

async function timeRaw(client, practicalId, repeats) {
  const times = []
  for (let i = 0; i < repeats; i++) {
    const t = performance.now()
    await client.query(RAW, [practicalId])
    times.push(performance.now() - t)
  }
  return median(times)
}

export async function benchSummary(world, { sizes = [2000, 20000], repeats = 9 } = {}) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  const cookie = await signIn(world.baseUrl, 'instructor@larkspur.example')
  const rows = []
  try {
    for (const n of sizes) {
      const practicalId = await fill(client, n)
      // One warm-up each, so both sides run with a warm cache and compiled code. The route's first
      // answer computes the class figures (later ones find them remembered until a result
      // changes): it is reported as coldRouteMs.
      const cold = await timeRoute(world.baseUrl, cookie, practicalId, 1)
      await timeRaw(client, practicalId, 1)
      const route = await timeRoute(world.baseUrl, cookie, practicalId, repeats)
      const raw = await timeRaw(client, practicalId, repeats)
      const changed = await timeAfterChange(world.baseUrl, cookie, client, practicalId, Math.ceil(repeats / 2))
      const goal = n >= 20000 ? 1.5 : null
      rows.push({ case: `GET summary, ${n} submissions`, rawSqlMs: raw, routeMs: route, ratio: route / raw, coldRouteMs: cold,
        afterChangeMs: changed, afterChangeRatio: changed / raw, goal: goal ? `<= ${goal}` : null, met: goal ? route / raw <= goal : null })
      const against = goal ? ` (goal <= ${goal})` : ''
      console.log(`  ${n} submissions: ${(route / raw).toFixed(2)}x${against}, ${route.toFixed(1)} vs ${raw.toFixed(1)} ms of raw SQL`
        + ` (first answer, figures computed: ${cold.toFixed(0)} ms; right after a result changed: ${changed.toFixed(0)} ms,`
        + ` ${(changed / raw).toFixed(2)}x)`)
    }
  } finally {
    await client.end()
  }
  if (rows.length === 2) {
    rows.push({
      case: `growth ${sizes[0]} → ${sizes[1]} (×${sizes[1] / sizes[0]} rows)`,
      rawSqlMs: rows[1].rawSqlMs / rows[0].rawSqlMs,
      routeMs: rows[1].routeMs / rows[0].routeMs,
      ratio: null,
      coldRouteMs: rows[1].coldRouteMs / rows[0].coldRouteMs,
      afterChangeMs: rows[1].afterChangeMs / rows[0].afterChangeMs,
      afterChangeRatio: null,
      goal: null,
      met: null,
    })
  }
  return rows
}
