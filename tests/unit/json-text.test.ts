import { describe, expect, it } from 'vitest'
import { acceptedEncoding } from '../../server/utils/json-text'

// Which stored compressed form a request gets: Accept-Encoding as RFC 9110 §12.5.3 reads it
// (q = 0 means "not acceptable"; `*` stands for any coding not named).
describe('acceptedEncoding', () => {
  it('prefers br, then gzip, and honours q = 0 and *', () => {
    expect(acceptedEncoding('gzip, deflate, br')).toBe('br')
    expect(acceptedEncoding('gzip, deflate')).toBe('gzip')
    expect(acceptedEncoding('br;q=0, gzip;q=0.5')).toBe('gzip')
    expect(acceptedEncoding('BR;Q=0.1')).toBe('br')
    expect(acceptedEncoding('*')).toBe('br')
    expect(acceptedEncoding('br;q=0, *')).toBe('gzip')
    expect(acceptedEncoding('deflate, identity')).toBeNull()
    expect(acceptedEncoding('')).toBeNull()
    expect(acceptedEncoding(undefined)).toBeNull()
  })
})
