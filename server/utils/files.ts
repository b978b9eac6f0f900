import { createHash } from 'node:crypto'
import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'

// "2 MB" as the peak-table parser counts it, so both refuse at the same size.
export const MAX_UPLOAD_BYTES = 2_000_000

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
 * 413 over the limit, 400 without a file. The name is kept for display only.
 */
export async function readUpload(event: H3Event, { maxBytes = MAX_UPLOAD_BYTES, field = 'file' } = {}): Promise<MultipartUpload> {
  const declared = Number(getRequestHeader(event, 'content-length') ?? 0)
  // Allow for the multipart envelope around the file itself.
  if (declared > maxBytes + 64 * 1024) throw tooLarge(maxBytes)
  // The platform's form parser: h3's own splits a part's header on "=" and ";", so a file named
  // like "a=b.csv" would lose its name and look absent.
  let form: FormData
  try {
    form = await toWebRequest(event).formData()
  } catch {
    throw createError({ statusCode: 400, statusMessage: `${field}: send the file as multipart/form-data` })
  }
  const entry = form.get(field)
  if (!entry || typeof entry === 'string') throw createError({ statusCode: 400, statusMessage: `${field}: no file was attached` })
  const bytes = Buffer.from(await entry.arrayBuffer())
  if (bytes.length > maxBytes) throw tooLarge(maxBytes)
  const fields: Record<string, string> = {}
  for (const [key, value] of form) if (key !== field && typeof value === 'string') fields[key] = value
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
  return createError({ statusCode: 413, statusMessage: `file: larger than ${(maxBytes / 1024 / 1024).toFixed(0)} MB` })
}

/**
 * Decodes an upload as text, judging by the bytes, not the name: NUL bytes or invalid UTF-8
 * mean it is not a text table. A UTF-8 BOM is dropped; Latin-1 exports are accepted.
 */
export function uploadAsText(file: UploadedFile): string {
  const bytes = file.bytes
  if (bytes.length === 0) throw createError({ statusCode: 422, statusMessage: 'file: the file is empty' })
  if (bytes.includes(0)) throw createError({ statusCode: 415, statusMessage: 'file: this is a binary file, not a text table (CSV, TSV or TXT)' })
  const utf8 = new TextDecoder('utf-8', { fatal: false }).decode(bytes)
  // Many replacement characters: not UTF-8; read as Windows-1252, which older instruments write.
  const broken = (utf8.match(/\uFFFD/g) ?? []).length
  const text = broken > 0 ? new TextDecoder('windows-1252').decode(bytes) : utf8
  return text.replace(/^\uFEFF/, '')
}

/** Keeps the original bytes forever (uploads are never lost); returns the file row id. */
export async function storeFile(db: Kysely<Database> | Transaction<Database>, file: UploadedFile, uploadedBy: number, mediaType = 'text/plain') {
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
