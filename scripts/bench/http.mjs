// Request throughput of Halocline routes against a bare node:http server answering the same
// small JSON, in alternating rounds so both see the same machine state.
import { createServer } from 'node:http'
import autocannon from 'autocannon'
import { signIn } from '../lib/world.mjs'

const BODY = JSON.stringify({ status: 'ok', database: 'ok', note: 'baseline body of about the same size' })

function bareServer() {
  return new Promise((resolve) => {
    const server = createServer((_req, res) => {
      res.writeHead(200, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(BODY) })
      res.end(BODY)
    })
    server.listen(0, '127.0.0.1', () => resolve(server))
  })
}

function run(url, headers = {}, seconds) {
  return new Promise((resolve, reject) => {
    autocannon({ url, connections: 10, duration: seconds, headers }, (error, result) => (error ? reject(error) : resolve(result)))
  })
}

export async function benchHttp(world, { rounds = 3, seconds = 4 } = {}) {
  const bare = await bareServer()
  const bareUrl = `http://127.0.0.1:${bare.address().port}/`
  const cookie = await signIn(world.baseUrl, 'student01@larkspur.example')
  const targets = [
    { name: 'GET /api/health (anonymous, one query)', url: `${world.baseUrl}/api/health`, headers: {} },
    { name: 'GET /api/overview/student (signed in)', url: `${world.baseUrl}/api/overview/student`, headers: { cookie } },
    { name: 'GET /api/me/lab (signed in, several queries)', url: `${world.baseUrl}/api/me/lab`, headers: { cookie } },
  ]
  const rows = []
  for (const target of targets) {
    const base = []
    const mine = []
    for (let i = 0; i < rounds; i++) {
      base.push((await run(bareUrl, {}, seconds)).requests.average)
      const r = await run(target.url, target.headers, seconds)
      if (r.non2xx > 0) throw new Error(`${target.name}: ${r.non2xx} non-2xx answers`)
      mine.push(r.requests.average)
    }
    const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]
    rows.push({ case: target.name, baselineReqPerSec: median(base), reqPerSec: median(mine), ratio: median(mine) / median(base) })
  }
  bare.close()
  return rows
}
