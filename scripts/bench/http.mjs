// Request throughput of Halocline's routes against bare node:http servers (http-baselines.mjs)
// that read the same rows with one plain SQL statement through a pg Pool of the same size, in
// alternating rounds so both see the same machine state. Routes that read nothing are measured
// against a bare server sending the same bytes.
import autocannon from 'autocannon'
import pg from 'pg'
import { signIn } from '../lib/world.mjs'
import { startBareServer } from './http-baselines.mjs'

function run(url, headers = {}, seconds) {
  return new Promise((resolve, reject) => {
    autocannon({ url, connections: 10, duration: seconds, headers }, (error, result) => (error ? reject(error) : resolve(result)))
  })
}

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]

/** Who and what the routes are read for: demo people and a practical that has results. */
async function fixtures(databaseUrl) {
  const client = new pg.Client({ connectionString: databaseUrl })
  await client.connect()
  try {
    const id = async (email) => (await client.query('select id from users where email = $1', [email])).rows[0].id
    const [instructor, ta, student] = [await id('instructor@larkspur.example'), await id('ta1@larkspur.example'),
      await id('student01@larkspur.example')]
    // The practical with the most results that runs in both the TA's and the student's section.
    const { rows: [practical] } = await client.query(`select p.id from practicals p
      where exists (select 1 from practical_sessions ps join section_tas t on t.section_id = ps.section_id
          where ps.practical_id = p.id and t.user_id = $1)
        and exists (select 1 from practical_sessions ps join enrollments e on e.section_id = ps.section_id
          where ps.practical_id = p.id and e.user_id = $2 and e.status = 'active')
      order by (select count(*) from submissions s where s.practical_id = p.id) desc, p.id limit 1`, [ta, student])
    const { rows: [range] } = await client.query(`select min(meeting_date) as "from",
      least(max(meeting_date), min(meeting_date) + 365) as "to" from practical_sessions`)
    return { instructor, ta, student, practicalId: practical.id, from: range.from, to: range.to }
  } finally {
    await client.end()
  }
}

export async function benchHttp(world, { rounds = 3, seconds = 4 } = {}) {
  const f = await fixtures(world.databaseUrl)
  const cookies = {
    instructor: await signIn(world.baseUrl, 'instructor@larkspur.example'),
    ta: await signIn(world.baseUrl, 'ta1@larkspur.example'),
    student: await signIn(world.baseUrl, 'student01@larkspur.example'),
    coordinator: await signIn(world.baseUrl, 'coordinator@larkspur.example'),
  }
  const student = await (await fetch(`${world.baseUrl}/api/overview/student`, { headers: { cookie: cookies.student } })).text()
  const p = f.practicalId
  const forecast = `/api/stockroom/forecast?from=${f.from}&to=${f.to}`
  const targets = [
    { name: 'GET /api/health (anonymous)', path: '/api/health', bare: JSON.stringify({ status: 'ok', database: 'ok' }), goal: 0.5 },
    { name: 'GET /api/overview/student (student)', path: '/api/overview/student', who: 'student', bare: student, goal: 0.5 },
    { name: 'GET /api/courses (instructor)', path: '/api/courses', who: 'instructor', bare: ['courses', [f.instructor]], goal: 0.8 },
    { name: 'GET /api/me/lab (student)', path: '/api/me/lab', who: 'student', bare: ['lab', [f.student]], goal: 0.8 },
    { name: 'GET /api/practicals/:id (student)', path: `/api/practicals/${p}`, who: 'student', bare: ['detail', [p, f.student]],
      goal: 0.8 },
    { name: 'GET /api/practicals/:id/queue (TA)', path: `/api/practicals/${p}/queue`, who: 'ta', bare: ['queue', [p, f.ta]], goal: 0.8 },
    { name: 'GET /api/practicals/:id/summary (instructor)', path: `/api/practicals/${p}/summary`, who: 'instructor',
      bare: ['summary', [p, f.instructor]], goal: 0.8 },
    { name: 'GET /api/stockroom/forecast (coordinator)', path: forecast, who: 'coordinator', bare: ['forecast', [f.from, f.to]],
      goal: 0.8 },
  ]
  const only = process.env.HALOCLINE_BENCH_ROUTES ? new RegExp(process.env.HALOCLINE_BENCH_ROUTES) : null
  const chosen = targets.filter((t) => !only || only.test(t.name))
  const bare = await startBareServer(world.databaseUrl, Object.fromEntries(chosen.map((t) => [t.path, t.bare])))
  const rows = []
  try {
    for (const target of chosen) {
      const headers = target.who ? { cookie: cookies[target.who] } : {}
      const check = await fetch(`${bare.url}${target.path}`)
      if (check.status !== 200) throw new Error(`bare ${target.name}: ${check.status} ${await check.text()}`)
      const base = []
      const mine = []
      for (let i = 0; i < rounds; i++) {
        const b = await run(`${bare.url}${target.path}`, {}, seconds)
        if (b.non2xx > 0) throw new Error(`bare ${target.name}: ${b.non2xx} non-2xx answers`)
        base.push(b.requests.average)
        const r = await run(`${world.baseUrl}${target.path}`, headers, seconds)
        if (r.non2xx > 0) throw new Error(`${target.name}: ${r.non2xx} non-2xx answers`)
        mine.push(r.requests.average)
      }
      const ratio = median(mine) / median(base)
      rows.push({ case: target.name, baselineReqPerSec: median(base), reqPerSec: median(mine), ratio, goal: `>= ${target.goal}`,
        met: ratio >= target.goal })
      const figures = `${median(mine).toFixed(0)} vs ${median(base).toFixed(0)} req/s`
      console.log(`  ${target.name}: ${ratio.toFixed(2)}x (goal >= ${target.goal}), ${figures}`)
    }
  } finally {
    await bare.close()
  }
  return rows
}
