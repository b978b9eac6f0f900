import type { H3Event } from 'h3'
import type { z } from 'zod'

export interface FieldIssue {
  field: string
  message: string
}

function issuesOf(error: z.ZodError): FieldIssue[] {
  return error.issues.map((issue) => ({ field: issue.path.join('.') || '(body)', message: issue.message }))
}

/** 400 naming the first bad field, with every issue in `data.issues` for forms. */
export function invalid(issues: FieldIssue[], statusCode = 400): never {
  const first = issues[0]
  throw createError({
    statusCode,
    statusMessage: first ? `${first.field}: ${first.message}` : 'Invalid request',
    data: { field: first?.field, issues },
  })
}

export function validate<T extends z.ZodType>(schema: T, value: unknown): z.output<T> {
  const result = schema.safeParse(value)
  if (!result.success) invalid(issuesOf(result.error))
  return result.data
}

/** No JSON body of ours comes near this (files go through readUpload); anything larger is refused unread. */
export const MAX_JSON_BYTES = 1_000_000
/** Beyond this a refused body is not read to its end: the connection is closed instead. */
const MAX_DRAIN_BYTES = 10_000_000

// The rest of a refused body is still on the wire: the answer closes the connection, so no client
// reuses a socket that is half-way through an upload.
function bodyTooLarge(event: H3Event) {
  setResponseHeader(event, 'connection', 'close')
  return createError({ statusCode: 413, statusMessage: `The request body is larger than ${MAX_JSON_BYTES / 1_000_000} MB` })
}

/** The raw body, refused with 413 as soon as it passes the cap, declared or chunked. */
function readCappedText(event: H3Event): Promise<string | undefined> {
  const req = event.node.req as typeof event.node.req & { body?: unknown }
  // Requests made inside Nitro (no socket) carry their body already; h3 knows how to read it.
  if (req.body !== undefined || !req.socket) return readRawBody(event, 'utf8')
  const declared = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (declared > MAX_DRAIN_BYTES) return Promise.reject(bodyTooLarge(event))
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    let refused = declared > MAX_JSON_BYTES
    const stop = () => { req.off('data', onData); req.off('end', onEnd); req.off('error', onError) }
    // Past the cap nothing more is kept. A modest remainder is read to the end and dropped, so the
    // client is still sending when it gets the 413 rather than a reset; a huge one is cut short.
    function onData(chunk: Buffer) {
      size += chunk.length
      if (size > MAX_JSON_BYTES) refused = true
      if (!refused) return void chunks.push(chunk)
      if (size > MAX_DRAIN_BYTES) { stop(); req.resume(); reject(bodyTooLarge(event)) }
    }
    function onEnd() {
      stop()
      if (refused) reject(bodyTooLarge(event))
      else resolve(chunks.length ? Buffer.concat(chunks).toString('utf8') : undefined)
    }
    function onError(error: Error) { stop(); reject(error) }
    req.on('data', onData)
    req.on('end', onEnd)
    req.on('error', onError)
  })
}

export async function readBodyAs<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.output<T>> {
  const text = await readCappedText(event)
  let body: unknown = {}
  if (text && text.trim() !== '') {
    try {
      body = JSON.parse(text)
    } catch {
      throw createError({ statusCode: 400, statusMessage: 'The request body is not valid JSON' })
    }
  }
  return validate(schema, body ?? {})
}

export function readQueryAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getQuery(event))
}

export function readParamsAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getRouterParams(event))
}
