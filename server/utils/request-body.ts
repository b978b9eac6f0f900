import type { H3Event } from 'h3'

/** Beyond this a refused body is not read to its end: the connection is closed instead. */
const MAX_DRAIN_BYTES = 10_000_000

/**
 * The raw body, or undefined for none; a body over `cap` bytes, declared or counted as it
 * arrives (chunked), is refused with `refuse()`. Nothing past the cap is kept. A modest remainder
 * is read to the end and dropped, so the client is still sending when it gets the refusal rather
 * than a reset; a huge one is cut short. Either way the answer closes the connection, so no
 * client reuses a socket half-way through a body.
 */
export function readCappedBody(event: H3Event, cap: number, refuse: () => Error): Promise<Buffer | undefined> {
  const req = event.node.req as typeof event.node.req & { body?: unknown }
  const refusal = () => {
    setResponseHeader(event, 'connection', 'close')
    return refuse()
  }
  // Requests made inside Nitro (no socket) carry their body already; h3 knows how to read it.
  if (req.body !== undefined || !req.socket) {
    return readRawBody(event, false).then((body) => {
      if (body && body.length > cap) throw refuse()
      return body
    })
  }
  const declared = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (declared > cap + MAX_DRAIN_BYTES) return Promise.reject(refusal())
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    let refused = declared > cap
    const stop = () => { req.off('data', onData); req.off('end', onEnd); req.off('error', onError) }
    function onData(chunk: Buffer) {
      size += chunk.length
      if (size > cap) refused = true
      if (!refused) return void chunks.push(chunk)
      if (size > cap + MAX_DRAIN_BYTES) { stop(); req.resume(); reject(refusal()) }
    }
    function onEnd() {
      stop()
      if (refused) reject(refusal())
      else resolve(chunks.length === 1 ? chunks[0] : chunks.length ? Buffer.concat(chunks, size) : undefined)
    }
    function onError(error: Error) { stop(); reject(error) }
    req.on('data', onData)
    req.on('end', onEnd)
    req.on('error', onError)
  })
}
