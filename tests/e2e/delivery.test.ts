import { request } from 'node:http'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO, signedIn } from '../support/http'

// Content-Encoding and Cache-Control as sent on the wire (RFC 9110 section 8.4 and 12.5.3,
// RFC 9111 section 5.2), read with node:http so that nothing decodes the body on the way.

interface Raw { status: number, headers: Record<string, string | string[] | undefined>, body: Buffer }

function getRaw(path: string, headers: Record<string, string> = {}): Promise<Raw> {
  return new Promise((resolve, reject) => {
    request(new URL(path, inject('baseUrl')), { headers, agent: false }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }))
      res.on('error', reject)
    }).on('error', reject).end()
  })
}

function decoded(raw: Raw): Buffer {
  const encoding = raw.headers['content-encoding']
  if (encoding === 'br') return brotliDecompressSync(raw.body)
  if (encoding === 'gzip') return gunzipSync(raw.body)
  return raw.body
}

const varyOf = (raw: Raw) => String(raw.headers.vary ?? '').toLowerCase()

let cookie = ''
const kinds: Array<{ kind: string, path: string, signedIn: boolean }> = []

beforeAll(async () => {
  const instructor = await signedIn(DEMO.instructor)
  cookie = instructor.cookieHeader
  const login = (await getRaw('/login', { 'accept-encoding': 'identity' })).body.toString('utf8')
  const script = login.match(/<script[^>]+src="(\/_nuxt\/[^"]+\.js)"/)?.[1]
  const stylesheet = login.match(/<link[^>]+rel="stylesheet"[^>]+href="(\/_nuxt\/[^"]+\.css)"/)?.[1]
  expect(script, 'the sign-in page names its entry script').toBeTruthy()
  expect(stylesheet, 'the sign-in page names its stylesheet').toBeTruthy()
  const courses = await instructor.get('/api/courses')
  const courseId = courses.body[0]!.id
  const practicals = await instructor.get(`/api/courses/${courseId}/practicals`)
  const practicalId = (practicals.body as Array<{ id: number }>)[0]!.id
  kinds.push(
    { kind: 'page', path: '/login', signedIn: false },
    { kind: 'JS', path: script!, signedIn: false },
    { kind: 'CSS', path: stylesheet!, signedIn: false },
    { kind: 'JSON', path: `/api/courses/${courseId}/sections`, signedIn: true },
    { kind: 'CSV', path: `/practicals/${practicalId}/grades.csv`, signedIn: true },
  )
})

describe('compression of every kind of answer', () => {
  it('is br when br is accepted, gzip when only gzip is, and the body is the same once decoded', async () => {
    for (const { kind, path, signedIn } of kinds) {
      const who: Record<string, string> = signedIn ? { cookie } : {}
      const plain = await getRaw(path, { ...who, 'accept-encoding': 'identity' })
      expect(plain.status, `${kind} ${path}`).toBe(200)
      expect(plain.body.length, `${kind} is large enough to be worth compressing`).toBeGreaterThan(1024)
      expect(plain.headers['content-encoding'], `${kind} not compressed when only identity is accepted`).toBeUndefined()

      const br = await getRaw(path, { ...who, 'accept-encoding': 'gzip, deflate, br' })
      expect(br.headers['content-encoding'], `${kind} with br accepted`).toBe('br')
      expect(varyOf(br), `${kind} Vary`).toContain('accept-encoding')
      expect(br.body.length, `${kind} smaller on the wire`).toBeLessThan(plain.body.length)
      expect(decoded(br).equals(plain.body), `${kind} decodes to the plain body`).toBe(true)

      const gzip = await getRaw(path, { ...who, 'accept-encoding': 'gzip' })
      expect(gzip.headers['content-encoding'], `${kind} with gzip accepted`).toBe('gzip')
      expect(decoded(gzip).equals(plain.body), `${kind} gunzips to the plain body`).toBe(true)
    }
  })

  it('sends nothing compressed when the request names no encoding', async () => {
    for (const { kind, path, signedIn } of kinds) {
      const raw = await getRaw(path, signedIn ? { cookie } : {})
      expect(raw.status).toBe(200)
      expect(raw.headers['content-encoding'], kind).toBeUndefined()
    }
  })

  it('an error page rendered for a refused page comes compressed and whole', async () => {
    const headers = { 'cookie': cookie, 'accept': 'text/html', 'accept-encoding': 'br, gzip' }
    const refused = await getRaw('/no-such-page-here', headers)
    expect(refused.status).toBe(404)
    expect(refused.headers['content-encoding']).toBe('br')
    expect(decoded(refused).toString('utf8')).toMatch(/<html[\s\S]*<\/html>/)
  })

  it('leaves an answer under 1 kB as it is', async () => {
    const raw = await getRaw('/api/health', { 'accept-encoding': 'br, gzip' })
    expect(raw.body.length).toBeLessThan(1024)
    expect(raw.headers['content-encoding']).toBeUndefined()
    expect(JSON.parse(raw.body.toString('utf8'))).toHaveProperty('status')
  })

  it('an answer sent whole states its length (RFC 9112 section 6.3) instead of arriving in chunks', async () => {
    const small = await getRaw('/api/health', { 'accept-encoding': 'br, gzip' })
    expect(small.headers['transfer-encoding']).toBeUndefined()
    expect(Number(small.headers['content-length'])).toBe(small.body.length)
    for (const { kind, path, signedIn } of kinds.filter((k) => k.kind === 'JSON' || k.kind === 'page')) {
      const who: Record<string, string> = signedIn ? { cookie } : {}
      const plain = await getRaw(path, { ...who, 'accept-encoding': 'identity' })
      expect(Number(plain.headers['content-length']), `${kind} plain`).toBe(plain.body.length)
      // Compressed, the plain length would be wrong: the header goes and the body is framed again.
      const br = await getRaw(path, { ...who, 'accept-encoding': 'br' })
      expect(br.headers['content-encoding'], kind).toBe('br')
      expect(Number(br.headers['content-length'] ?? br.body.length), `${kind} compressed`).toBe(br.body.length)
    }
    const refused = await getRaw('/api/courses/999999999', { cookie })
    expect(refused.status).toBe(404)
    expect(Number(refused.headers['content-length'])).toBe(refused.body.length)
  })

  it('a HEAD request gets the headers and no body', async () => {
    const head = await new Promise<Raw>((resolve, reject) => {
      request(new URL('/login', inject('baseUrl')), { method: 'HEAD', headers: { 'accept-encoding': 'br' }, agent: false }, (res) => {
        res.resume()
        res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.alloc(0) }))
      }).on('error', reject).end()
    })
    expect(head.status).toBe(200)
    expect(head.headers['content-encoding']).toBeUndefined()
  })
})

describe('Cache-Control', () => {
  it('hashed build files are kept for a year and never revalidated', async () => {
    for (const { path } of kinds.filter((k) => k.path.startsWith('/_nuxt/'))) {
      for (const encoding of ['br', 'identity']) {
        const raw = await getRaw(path, { 'accept-encoding': encoding })
        expect(raw.headers['cache-control'], `${path} (${encoding})`).toBe('public, max-age=31536000, immutable')
      }
    }
  })

  it('signed-in JSON and pages are never stored; the sign-in page is checked again each time', async () => {
    for (const path of ['/api/courses', '/api/overview/instructor', kinds.find((k) => k.kind === 'JSON')!.path, '/']) {
      const raw = await getRaw(path, { cookie, 'accept-encoding': 'br' })
      expect(raw.status, path).toBe(200)
      expect(raw.headers['cache-control'], path).toBe('private, no-store')
    }
    expect((await getRaw('/login')).headers['cache-control']).toBe('no-cache')
    expect((await getRaw('/favicon.svg')).headers['cache-control']).toBe('public, max-age=86400')
  })

  it('a route that sets its own keeps it (the grade sheet)', async () => {
    const csv = kinds.find((k) => k.kind === 'CSV')!
    const raw = await getRaw(csv.path, { cookie, 'accept-encoding': 'br' })
    expect(raw.headers['cache-control']).toBe('private, no-store')
    expect(raw.headers['content-disposition']).toMatch(/^attachment;/)
  })
})
