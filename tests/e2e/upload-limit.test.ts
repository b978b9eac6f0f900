import { beforeAll, describe, expect, it } from 'vitest'
import { MAX_UPLOAD_BYTES } from '../../shared/utils/limits'
import { makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import type { Client } from '../support/http'
import { testDb } from '../support/db'

// The page checks a chosen file against the same MAX_UPLOAD_BYTES (composables/useUpload.ts,
// tests/nuxt/upload-limit.test.ts): a file the page lets through is one the server reads, and a
// byte more is refused by both.
let gc: GcPractical
let student: Client

beforeAll(async () => {
  gc = await makeGcPractical({ students: 1 })
  student = await gc.signIn(gc.students[0]!)
})

/** A peak table padded with blank lines to exactly `size` bytes. */
function tableOfSize(size: number) {
  const head = 'RT [min],Area\n3.10,12000\n3.60,8000\n'
  return head + '\n'.repeat(size - head.length)
}

describe('the upload size limit', () => {
  it('reads a file of exactly the limit and refuses one byte more with 413', async () => {
    const atLimit = await uploadGc(student, gc.practicalId, tableOfSize(MAX_UPLOAD_BYTES), { preview: true })
    expect(atLimit.status).not.toBe(413)
    expect(atLimit.status).toBeLessThan(500)
    const over = await uploadGc(student, gc.practicalId, tableOfSize(MAX_UPLOAD_BYTES + 1), { preview: true })
    expect(over.status).toBe(413)
  })

  it('counts a chunked body as it arrives: one byte over is a 413 and nothing is stored', async () => {
    const before = await testDb().selectFrom('submissions').select((eb) => eb.fn.countAll<string>().as('n'))
      .where('practicalId', '=', gc.practicalId).executeTakeFirstOrThrow()
    // The form's bytes as the browser would send them, but with no Content-Length.
    const form = new FormData()
    form.append('file', new Blob([tableOfSize(MAX_UPLOAD_BYTES + 1)], { type: 'text/csv' }), 'over.csv')
    const encoded = new Response(form)
    const bytes = new Uint8Array(await encoded.arrayBuffer())
    const stream = new ReadableStream({
      start(controller) {
        for (let i = 0; i < bytes.length; i += 64 * 1024) controller.enqueue(bytes.slice(i, i + 64 * 1024))
        controller.close()
      },
    })
    const over = await student.request(`/api/practicals/${gc.practicalId}/submissions`, {
      method: 'POST', body: stream, duplex: 'half', headers: { 'content-type': encoded.headers.get('content-type')! },
    })
    expect(over.status).toBe(413)
    expect(over.refusal.statusMessage).toMatch(/^file: larger than/)
    const after = await testDb().selectFrom('submissions').select((eb) => eb.fn.countAll<string>().as('n'))
      .where('practicalId', '=', gc.practicalId).executeTakeFirstOrThrow()
    expect(after.n).toBe(before.n)
  })
})
