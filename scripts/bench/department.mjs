// A large department: one term of 80 sections of 25 students (2,000), four practicals each, about
// 8,000 work units and 20,000 versions, seeded through the product's own engines and rows
// (server/database/seed/department.ts). Each role's main routes, those its pages call, are timed
// at a tenth of that size and again at full size in the same run: p50 and p95, the growth
// between the two (the data grew tenfold: 10 or less is linear or better) and the 300 ms goal.
import pg from 'pg'
import { register } from 'tsx/esm/api'
import { signIn } from '../lib/world.mjs'

const FULL_SECTIONS = 80
const SMALL_SECTIONS = FULL_SECTIONS / 10
const P95_GOAL_MS = 300
const day = (offset) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10)
const quantile = (xs, q) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(q * xs.length))]

async function seed(world, from, to) {
  register()
  const { seedDepartmentSections } = await import('../../server/database/tasks.ts')
  const started = performance.now()
  await seedDepartmentSections(world.databaseUrl, from, to)
  return (performance.now() - started) / 1000
}

/** The ids the routes need, looked up in the database: one practical, one TA's and one student's submission. */
export async function targets(world) {
  const client = new pg.Client({ connectionString: world.databaseUrl })
  await client.connect()
  try {
    const one = async (text, values) => (await client.query(text, values)).rows[0]
    const course = await one(`select id from courses where code = 'CHEM 2290'`)
    const practical = await one('select id from practicals where course_id = $1 order by id limit 1', [course.id])
    const ta = await one(`select id from users where email = 'dept-ta01@larkspur.example'`)
    const taSubmission = await one(`select s.id from submissions s join section_tas t on t.section_id = s.section_id
      where t.user_id = $1 and s.practical_id = $2 order by s.version desc, s.id limit 1`, [ta.id, practical.id])
    const student = await one(`select id from users where email = 'dept-s0001@larkspur.example'`)
    const ownSubmission = await one(
      'select id from submissions where submitted_by = $1 and practical_id = $2 order by version desc limit 1',
      [student.id, practical.id])
    const counts = await one(`select (select count(*) from submissions s join practicals p on p.id = s.practical_id
      where p.course_id = $1)::int as versions, (select count(distinct (practical_id, unit_key)) from submissions s
      join practicals p on p.id = s.practical_id where p.course_id = $1)::int as units,
      (select count(*) from enrollments where course_id = $1)::int as students`, [course.id])
    return { courseId: course.id, practicalId: practical.id, taSubmissionId: taSubmission.id, ownSubmissionId: ownSubmission.id, counts }
  } finally {
    await client.end()
  }
}

/** Each role's pages' routes. */
function routesOf(t) {
  const p = t.practicalId
  return [
    ['instructor', 'home', '/api/overview/instructor'],
    ['instructor', 'courses', '/api/courses'],
    ['instructor', 'course', `/api/courses/${t.courseId}`],
    ['instructor', 'course sections', `/api/courses/${t.courseId}/sections`],
    ['instructor', 'practical detail', `/api/practicals/${p}`],
    ['instructor', 'practical card', `/api/practicals/${p}/card`],
    ['instructor', 'class results', `/api/results/practicals/${p}`],
    ['instructor', 'class summary', `/api/practicals/${p}/summary`],
    ['instructor', 'grades CSV', `/practicals/${p}/grades.csv`],
    ['ta', 'home', '/api/overview/ta'],
    ['ta', 'review practicals', '/api/review/practicals'],
    ['ta', 'review queue', `/api/practicals/${p}/queue`],
    ['ta', 'a submission', `/api/submissions/${t.taSubmissionId}`],
    ['student', 'home (me/lab)', '/api/me/lab'],
    ['student', 'overview', '/api/overview/student'],
    ['student', 'own submissions', `/api/practicals/${p}/my-submissions`],
    ['student', 'own file', `/submissions/${t.ownSubmissionId}/file`],
    ['coordinator', 'home', '/api/overview/coordinator'],
    // The forecast page's range, widened back over the term so the department's sessions are in it.
    ['coordinator', 'forecast', `/api/stockroom/forecast?from=${day(-63)}&to=${day(27)}`],
    ['coordinator', 'orders', '/api/stockroom/orders'],
  ]
}

const ACCOUNTS = {
  instructor: 'dept-instructor@larkspur.example',
  ta: 'dept-ta01@larkspur.example',
  student: 'dept-s0001@larkspur.example',
  coordinator: 'coordinator@larkspur.example',
}

/** p50 and p95 of `rounds` sequential requests per route, after two warm-up requests; `only` picks routes by "role name". */
export async function timeRoutes(world, t, rounds, only = null) {
  const cookies = {}
  for (const [role, email] of Object.entries(ACCOUNTS)) cookies[role] = await signIn(world.baseUrl, email)
  const out = new Map()
  for (const [role, name, path] of routesOf(t)) {
    if (only && !only.test(`${role} ${name}`)) continue
    const times = []
    // Warm-up: a server just started may still be starting its queue (503 for a moment).
    for (let i = 0; i < 60; i++) {
      const response = await fetch(`${world.baseUrl}${path}`, { headers: { cookie: cookies[role] } })
      await response.arrayBuffer()
      if (response.status !== 503) break
      await new Promise((resolve) => setTimeout(resolve, 500))
    }
    for (let i = 0; i < rounds + 2; i++) {
      const started = performance.now()
      const response = await fetch(`${world.baseUrl}${path}`, { headers: { cookie: cookies[role] } })
      const body = await response.arrayBuffer()
      if (response.status !== 200) throw new Error(`${role} ${path}: ${response.status} ${new TextDecoder().decode(body).slice(0, 300)}`)
      if (i >= 2) times.push(performance.now() - started)
    }
    out.set(`${role} ${name}`, { role, route: name, path, p50: quantile(times, 0.5), p95: quantile(times, 0.95) })
  }
  return out
}

export async function benchDepartment(world, { rounds = 30 } = {}) {
  const seconds = { small: await seed(world, 0, SMALL_SECTIONS) }
  const small = await timeRoutes(world, await targets(world), rounds)
  seconds.full = await seed(world, SMALL_SECTIONS, FULL_SECTIONS)
  const t = await targets(world)
  const full = await timeRoutes(world, t, rounds)
  console.log(`\n  department: ${t.counts.students} students, ${t.counts.units} work units, ${t.counts.versions} versions;`
    + ` seeded in ${seconds.small.toFixed(0)} s + ${seconds.full.toFixed(0)} s`)
  const rows = []
  for (const [key, f] of full) {
    const s = small.get(key)
    const growth = f.p50 / s.p50
    rows.push({
      role: f.role, route: f.route,
      smallP50Ms: s.p50, smallP95Ms: s.p95, fullP50Ms: f.p50, fullP95Ms: f.p95,
      growth, growthGoal: `<= 10 (data x10): ${growth <= 10 ? 'met' : 'MISSED'}`,
      p95Goal: `<= ${P95_GOAL_MS} ms: ${f.p95 <= P95_GOAL_MS ? 'met' : 'OVER'}`,
    })
  }
  rows.push({ role: 'all', route: 'seeded', students: t.counts.students, units: t.counts.units, versions: t.counts.versions,
    seedSeconds: seconds.small + seconds.full })
  return rows
}
