import { beforeAll, describe, expect, it } from 'vitest'
import { MAX_UPLOAD_BYTES } from '../../shared/utils/limits'
import { makeGcPractical, uploadGc, type GcPractical } from '../support/gc'
import type { Client } from '../support/http'

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
})
