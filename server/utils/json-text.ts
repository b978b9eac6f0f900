import type { H3Event } from 'h3'
import { promisify } from 'node:util'
import { brotliCompress, constants, gzip } from 'node:zlib'

/**
 * A JSON answer already written (by an engine worker) and remembered, with its compressed forms
 * made once, when first asked for. At 20,000 results a class summary is 2 MB: compressing it
 * again for every reader cost a third of a second of the thread pool and left the request loop
 * collecting the garbage.
 */
export interface JsonBytes {
  bytes: Uint8Array
  encoded: Partial<Record<'br' | 'gzip', Promise<Buffer>>>
}

export const jsonBytes = (bytes: Uint8Array): JsonBytes => ({ bytes, encoded: {} })

// Smaller answers are left to server/middleware/0.compression.ts, which compresses as it sends.
const COMPRESS_ONCE_FROM_BYTES = 32 * 1024
// The middleware's own level (br 4): about gzip's cost for nearly all of br's gain.
const brotli = promisify(brotliCompress)
const gzipped = promisify(gzip)
const compress = (encoding: 'br' | 'gzip', bytes: Uint8Array) => (encoding === 'br'
  ? brotli(bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: 4, [constants.BROTLI_PARAM_SIZE_HINT]: bytes.byteLength } })
  : gzipped(bytes))

/** br, else gzip, when the request accepts it (a q of 0 refuses; `*` accepts either). */
export function acceptedEncoding(header: string | undefined): 'br' | 'gzip' | null {
  const offers = (header ?? '').toLowerCase().split(',').map((part) => {
    const [name = '', ...params] = part.split(';').map((p) => p.trim())
    const q = params.find((p) => p.startsWith('q='))
    return { name, q: q ? Number(q.slice(2)) : 1 }
  })
  const accepts = (name: string) => {
    const own = offers.find((o) => o.name === name)
    return own ? own.q > 0 : offers.some((o) => o.name === '*' && o.q > 0)
  }
  return accepts('br') ? 'br' : accepts('gzip') ? 'gzip' : null
}

/**
 * Sends remembered JSON as it is (compressed once per answer and encoding when large and
 * accepted). Typed as what the text holds, so the route's answer type (typed fetch, the test
 * client) stays the object's.
 */
export async function sendJsonBytes<T>(event: H3Event, answer: JsonBytes): Promise<T> {
  // The bytes are the JSON of a T; h3 sends them as they are. One cast, here.
  return (await encodedBody(event, answer)) as unknown as T
}

/** Sends JSON text PostgreSQL wrote (readTextOnceCompiled), typed as what it holds. */
export function sendJsonText<T>(event: H3Event, text: string): T {
  setResponseHeader(event, 'content-type', 'application/json')
  // The text is the JSON of a T; h3 sends a string as it is. One cast, here.
  return text as unknown as T
}

async function encodedBody(event: H3Event, answer: JsonBytes): Promise<Uint8Array> {
  setResponseHeader(event, 'content-type', 'application/json')
  if (answer.bytes.byteLength < COMPRESS_ONCE_FROM_BYTES) return answer.bytes
  appendResponseHeader(event, 'vary', 'Accept-Encoding')
  const encoding = acceptedEncoding(getRequestHeader(event, 'accept-encoding'))
  if (!encoding) return answer.bytes
  const made = answer.encoded[encoding] ??= compress(encoding, answer.bytes)
  try {
    const body = await made
    setResponseHeader(event, 'content-encoding', encoding)
    return body
  } catch {
    // Sent as it is; the next reader tries again.
    if (answer.encoded[encoding] === made) delete answer.encoded[encoding]
    return answer.bytes
  }
}
