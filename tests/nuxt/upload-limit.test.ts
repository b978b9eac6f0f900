import { describe, expect, it } from 'vitest'
import { MAX_UPLOAD_BYTES } from '#shared/utils/limits'
import { chosenFileProblem } from '~/composables/useUpload'

// The same limit the server enforces (tests/e2e/upload-limit.test.ts checks the server side).
describe('the page checks a chosen file against the server limit', () => {
  const fileOf = (size: number) => new File([new Uint8Array(size).fill(10)], 'run.csv', { type: 'text/csv' })

  it('lets a file of exactly the limit through and stops one byte more', () => {
    expect(chosenFileProblem(fileOf(MAX_UPLOAD_BYTES))).toBeNull()
    expect(chosenFileProblem(fileOf(MAX_UPLOAD_BYTES + 1))).toMatch(/larger than 2 MB/)
  })
})
