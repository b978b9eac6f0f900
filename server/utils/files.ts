import { createHash } from 'node:crypto'
import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'
import { MAX_UPLOAD_BYTES } from '#shared/utils/limits'
import { decodeTextBytes } from '#shared/utils/lib/text-encoding'
import { codePointLabel, unfitCharacter } from '#shared/utils/text-input'
import { readCappedBody } from './request-body'
import { byteFormatOf, nonTextFormatProblem, UploadFormatError } from '#shared/utils/lib/upload-content'

export interface UploadedFile {
  name: string
  bytes: Buffer
  /** What the browser claimed; never trusted for anything but display. */
  claimedType: string | null
  sha256: string
}

export interface MultipartUpload {
  file: UploadedFile
  /** The other (text) fields of the form. */
  fields: Record<string, string>
}

/**
 * Reads a multipart form with one `file` field, refusing oversize bodies before parsing them:
 * 413 over the limit (declared, or counted as a chunked body arrives), 400 without a file. The
 * name is kept for display only.
 */
export async function readUpload(event: H3Event, { maxBytes = MAX_UPLOAD_BYTES, field = 'file' } = {}): Promise<MultipartUpload> {
  // Allow for the multipart envelope around the file itself; the file's own size is checked below.
  const body = await readCappedBody(event, maxBytes + 64 * 1024, () => tooLarge(maxBytes))
  // The platform's form parser: h3's own splits a part's header on "=" and ";", so a file named
  // like "a=b.csv" would lose its name and look absent. It is given the body once it has all
  // arrived: reading the request as a web stream cost more than parsing the form.
  let form: FormData
  try {
    const type = getRequestHeader(event, 'content-type') ?? ''
    const bytes = body && new Uint8Array(body.buffer as ArrayBuffer, body.byteOffset, body.byteLength)
    form = await new Response(bytes ?? null, { headers: { 'content-type': type } }).formData()
  } catch {
    throw createError({ statusCode: 400, statusMessage: `${field}: send the file as multipart/form-data` })
  }
  const entry = form.get(field)
  if (!entry || typeof entry === 'string') throw createError({ statusCode: 400, statusMessage: `${field}: no file was attached` })
  const bytes = Buffer.from(await entry.arrayBuffer())
  if (bytes.length > maxBytes) throw tooLarge(maxBytes)
  const fields: Record<string, string> = {}
  for (const [key, value] of form) if (key !== field && typeof value === 'string') fields[key] = value
  // The same character rule as JSON bodies; the name is kept and shown, so it is one line too.
  refuseControlCharacters(fields)
  const unfit = unfitCharacter(entry.name ?? '', { singleLine: true })
  if (unfit) {
    throw createError({
      statusCode: 400,
      statusMessage: `${field}: Rename the file: its name holds the control character ${codePointLabel(unfit)}`,
      data: { field },
    })
  }
  return {
    file: {
      name: (entry.name || 'upload').slice(0, 200),
      bytes,
      claimedType: entry.type || null,
      sha256: createHash('sha256').update(bytes).digest('hex'),
    },
    fields,
  }
}

function tooLarge(maxBytes: number) {
  return createError({ statusCode: 413, statusMessage: `file: larger than ${+(maxBytes / 1e6).toFixed(1)} MB` })
}

/**
 * Decodes an upload as text, judging by the bytes, not the name: UTF-8 (with or without a BOM),
 * UTF-16 "Unicode text" (by its BOM or its pattern of zero bytes) or Windows-1252. Other binary
 * files are a 415 naming what they seem to be.
 */
export function uploadAsText(file: UploadedFile): string {
  const problem = nonTextFormatProblem(byteFormatOf(file.bytes), file.bytes)
  if (problem) throw createError({ statusCode: 415, statusMessage: `file: ${problem}` })
  const decoded = decodeTextBytes(file.bytes)
  if (decoded.ok) return decoded.text
  const status = decoded.reason === 'binary' ? 415 : 422
  const reason = decoded.reason === 'binary' ? 'this is a binary file, not a text table (CSV, TSV or TXT)' : decoded.message
  throw createError({ statusCode: status, statusMessage: `file: ${reason}` })
}

/**
 * An unreadable GC upload (text, .xlsx or ANDI/AIA netCDF) as its 415 or 422, with the reason and
 * the stored peaks at fault; any other error unchanged.
 */
export function asUploadFormatError(error: unknown): unknown {
  if (error instanceof UploadFormatError) {
    return createError({ statusCode: error.status, statusMessage: `file: ${error.message}`, data: { rows: error.rows.slice(0, 50) } })
  }
  return error
}

/** Keeps the original bytes forever (uploads are never lost); returns the file row id. */
export async function storeFile(
  db: Kysely<Database> | Transaction<Database>,
  file: UploadedFile,
  uploadedBy: number,
  mediaType = 'text/plain',
) {
  const row = await db.insertInto('files').values({
    sha256: file.sha256,
    byteSize: file.bytes.length,
    mediaType,
    originalName: file.name,
    content: file.bytes,
    uploadedBy,
  }).returning('id').executeTakeFirstOrThrow()
  return row.id
}
