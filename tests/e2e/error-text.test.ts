import { request as httpRequest } from 'node:http'
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest'
import type { Client, Refusal } from '../support/http'
import { signedIn } from '../support/http'
import { closeTestDb, TEST_PASSWORD } from '../support/db'
import { insertResult, makeCourse } from '../support/fixtures'

// What an error says, and where: the HTTP status line gets a short printable-ASCII reason
// (clients and proxies refuse a long one: RFC 9112 leaves the length to them, Node's own parser
// stops at 16 KiB of head), the JSON body keeps the sentence, capped, and input is only ever
// quoted as a short excerpt without markup.

let student: Client
let owner: Client
let ta: Client
let practicalId: number
let submissionId: number
let cookie: string

beforeAll(async () => {
  const course = await makeCourse({ sections: 1, studentsPerSection: 1 })
  const section = course.sections[0]!
  practicalId = course.practicalId
  student = await signedIn(section.students[0]!.email, TEST_PASSWORD)
  owner = await signedIn(course.owner.email, TEST_PASSWORD)
  ta = await signedIn(section.ta.email, TEST_PASSWORD)
  submissionId = await insertResult(practicalId, section.id, section.students[0]!.id, { secondary: 3 }, { status: 'pending' })
  cookie = student.cookieHeader
})
afterAll(closeTestDb)

/** The reply with the status line's reason phrase; `refusal` is the JSON body of a 4xx or 5xx. */
interface Raw { status: number, statusMessage: string, body: unknown, refusal: Refusal }

/** A request through node:http, which hands over the status line's reason phrase as sent. */
async function raw(path: string, init: { method?: string, body?: Uint8Array, headers?: Record<string, string> }): Promise<Raw> {
  const url = new URL(path, inject('baseUrl'))
  return new Promise((resolve, reject) => {
    const req = httpRequest(url, { method: init.method ?? 'GET', headers: { cookie, ...init.headers } }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c) => chunks.push(c))
      res.on('end', () => {
        const text = Buffer.concat(chunks).toString('utf8')
        const body: unknown = res.headers['content-type']?.includes('json') ? JSON.parse(text) : text
        resolve({ status: res.statusCode!, statusMessage: res.statusMessage ?? '', body, refusal: body as Refusal })
      })
    })
    req.on('error', reject)
    req.end(init.body)
  })
}

async function previewUpload(text: string): Promise<Raw> {
  const form = new FormData()
  form.append('file', new File([text], 'run.csv', { type: 'text/csv' }))
  const response = new Response(form)
  const body = new Uint8Array(await response.arrayBuffer())
  return raw(`/api/practicals/${practicalId}/submissions/preview`, { method: 'POST', body, headers: { 'content-type': response.headers.get('content-type')! } })
}

const PRINTABLE_ASCII = /^[\x20-\x7E]*$/

describe('the status line and the message of an error', () => {
  it('a 1.9 MB cell in the area column gives a short ASCII status line and a capped message', async () => {
    const reply = await previewUpload(`Peak,RT,Area\n1,2.10,1000\n2,3.20,2000\n3,4.10,${'9'.repeat(1_900_000)}x\n`)
    expect(reply.status).toBe(422)
    expect(reply.statusMessage.length).toBeLessThanOrEqual(200)
    expect(reply.statusMessage).toMatch(PRINTABLE_ASCII)
    expect(reply.statusMessage).toMatch(/^file: Row 4: the area "9{10,}\.\.\." is not a number\.$/)
    expect(reply.refusal.statusMessage.length).toBeLessThanOrEqual(500)
    expect(reply.refusal.message.length).toBeLessThanOrEqual(500)
    expect(JSON.stringify(reply.body).length).toBeLessThan(20_000)
  })

  it('a 100 kB quoted cell is quoted in at most 40 characters', async () => {
    const reply = await previewUpload(`Peak,RT,Area\n1,2.10,1000\n2,3.20,"${'a'.repeat(100_000)}"\n`)
    expect(reply.status).toBe(422)
    const quoted = /"([^"]*)"/.exec(reply.refusal.statusMessage)![1]!
    expect(quoted.length).toBeLessThanOrEqual(40)
    expect(quoted.endsWith('…')).toBe(true)
    expect(reply.statusMessage.length).toBeLessThanOrEqual(200)
    expect(reply.statusMessage).toMatch(PRINTABLE_ASCII)
  })

  it('a cell holding HTML is not echoed as markup, in the body or in the status line', async () => {
    const reply = await previewUpload('Peak,RT,Area\n1,2.10,1000\n2,3.20,<img src=x onerror=alert(1)>\n')
    expect(reply.status).toBe(422)
    expect(JSON.stringify(reply.body)).not.toMatch(/<img/i)
    expect(reply.refusal.statusMessage).toContain('‹img src=x onerror=alert(1)›')
    expect(reply.statusMessage).not.toMatch(/[<>]/)
    expect(reply.statusMessage).toMatch(PRINTABLE_ASCII)
  })

  it('a message with "°C" keeps it in the body and spells it in ASCII on the status line', async () => {
    const form = JSON.stringify({ name: 'Too hot', reagent: 'cl2-light', temperatureC: 500, reactivity: { primary: 1, secondary: 3.8, tertiary: 5 }, source: 'From memory' })
    const reply = await raw('/api/methods', { method: 'POST', body: new TextEncoder().encode(form), headers: { 'content-type': 'application/json', 'cookie': owner.cookieHeader } })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage).toBe('temperatureC: At most 400 °C')
    expect(reply.statusMessage).toBe('temperatureC: At most 400 degC')
  })

  it('a record key sent by the client is quoted short in the field name', async () => {
    const key = 'k'.repeat(10_000)
    const reply = await ta.post(`/api/submissions/${submissionId}/review`, { decision: 'accept', scores: { [key]: 1 } })
    expect(reply.status).toBe(400)
    expect(reply.refusal.statusMessage.length).toBeLessThan(120)
    expect(reply.refusal.statusMessage).toMatch(/^scores\.k{20,}…: Not a criterion key$/)
  })

  it('a body of 200 bad items answers with the first and at most 50 issues', async () => {
    const reply = await owner.post(`/api/practicals/${practicalId}/digests`, { sectionIds: Array.from({ length: 200 }, () => 'x') })
    expect(reply.status).toBe(400)
    expect(reply.refusal.data?.issues).toHaveLength(50)
    expect(reply.refusal.statusMessage).toBe('sectionIds.0: Pick a section from the list')
  })
})
