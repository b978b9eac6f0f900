// What an uploaded GC file holds, judged by its bytes (magic numbers), never by its name:
// text for the peak-table and trace parsers (any of the usual encodings), the first sheet of an
// .xlsx workbook as text, or an ANDI/AIA netCDF chromatogram as a trace or a stored peak table.
import { readAndiChromatogram, AndiFileError } from './andi'
import type { Peak, RowError } from './peak-table'
import { readFirstSheetText, SpreadsheetError } from './spreadsheet'
import { decodeTextBytes } from './text-encoding'

/** What the run engine reads: text to parse, or a trace or peak list another reader has made. */
export type RunSource =
  | { kind: 'text', text: string, warnings?: string[] }
  | { kind: 'trace', time: ArrayLike<number>, signal: ArrayLike<number>, warnings?: string[] }
  | { kind: 'peaks', peaks: Peak[], warnings?: string[] }

export const XLSX_MEDIA_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'
export const NETCDF_MEDIA_TYPE = 'application/x-netcdf'

export type ByteFormat = 'zip' | 'ole2' | 'netcdf' | 'netcdf-64bit-data' | 'hdf5' | 'other'

const startsWith = (bytes: Uint8Array, magic: number[]) => magic.every((b, i) => bytes[i] === b)

/** The container a file's first bytes announce ('other' covers text and unknown binaries). */
export function byteFormatOf(bytes: Uint8Array): ByteFormat {
  if (startsWith(bytes, [0x50, 0x4b, 0x03, 0x04]) || startsWith(bytes, [0x50, 0x4b, 0x05, 0x06])) return 'zip'
  if (startsWith(bytes, [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1])) return 'ole2'
  // "CDF" and a version byte: 1 classic, 2 64-bit offsets (both netCDF classic), 5 64-bit data.
  if (startsWith(bytes, [0x43, 0x44, 0x46]) && (bytes[3] === 1 || bytes[3] === 2)) return 'netcdf'
  if (startsWith(bytes, [0x43, 0x44, 0x46, 0x05])) return 'netcdf-64bit-data'
  if (startsWith(bytes, [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a])) return 'hdf5'
  return 'other'
}

/**
 * An Office file with a password is an OLE2 compound file holding an "EncryptedPackage"
 * stream (its directory names are UTF-16LE); an old .xls is an OLE2 file without one.
 */
export function isEncryptedOfficeFile(bytes: Uint8Array): boolean {
  const name = Array.from('EncryptedPackage', (c) => [c.charCodeAt(0), 0]).flat()
  outer: for (let i = 0; i + name.length <= bytes.length; i++) {
    for (let j = 0; j < name.length; j++) if (bytes[i + j] !== name[j]) continue outer
    return true
  }
  return false
}

export class UploadFormatError extends Error {
  constructor(readonly status: 415 | 422, message: string, readonly rows: RowError[] = []) {
    super(message)
    this.name = 'UploadFormatError'
  }
}

/** Why a file that is not text cannot be read as text; null for an unknown binary. */
export function nonTextFormatProblem(format: ByteFormat, bytes: Uint8Array): string | null {
  switch (format) {
    case 'zip': return 'this is a zip archive or an Excel workbook (.xlsx), not a text table'
    case 'ole2': return isEncryptedOfficeFile(bytes)
      ? 'this file is protected with a password: remove the password in the program that made it, save it again and upload that'
      : 'this is an old binary Excel file (.xls) or another Office document: save it as .xlsx or CSV'
    case 'netcdf': return 'this is a netCDF file, not a text table'
    case 'netcdf-64bit-data':
      return 'this netCDF file uses the 64-bit data format (CDF-5): export the chromatogram as ANDI/AIA netCDF classic (.cdf)'
    case 'hdf5': return 'this is a netCDF-4 (HDF5) file: export the chromatogram as ANDI/AIA netCDF classic (.cdf)'
    default: return null
  }
}

export interface UploadContent {
  format: 'text' | 'xlsx' | 'netcdf'
  /** For the stored file; null when the kind of run decides (text tables and traces). */
  mediaType: string | null
  source: RunSource
}

/** Reads a GC upload: 415 for what is not one of the formats, 422 for a damaged or unusable one. */
export async function readUploadContent(bytes: Uint8Array): Promise<UploadContent> {
  const format = byteFormatOf(bytes)
  if (format === 'zip') {
    try {
      const { text, warnings } = await readFirstSheetText(bytes)
      return { format: 'xlsx', mediaType: XLSX_MEDIA_TYPE, source: { kind: 'text', text, warnings } }
    } catch (error) {
      if (error instanceof SpreadsheetError) throw new UploadFormatError(error.status, error.message)
      throw error
    }
  }
  if (format === 'netcdf') {
    try {
      const content = readAndiChromatogram(bytes)
      return { format: 'netcdf', mediaType: NETCDF_MEDIA_TYPE, source: content }
    } catch (error) {
      if (error instanceof AndiFileError) throw new UploadFormatError(422, `netCDF: ${error.message}`, error.rows)
      throw error
    }
  }
  const problem = nonTextFormatProblem(format, bytes)
  if (problem) throw new UploadFormatError(format === 'ole2' && isEncryptedOfficeFile(bytes) ? 422 : 415, problem)
  const decoded = decodeTextBytes(bytes)
  if (!decoded.ok) {
    if (decoded.reason === 'binary') {
      throw new UploadFormatError(
        415,
        'this is a binary file, not a GC export this site reads (CSV, TSV or TXT text, .xlsx, or ANDI/AIA netCDF .cdf)',
      )
    }
    throw new UploadFormatError(422, decoded.message)
  }
  return { format: 'text', mediaType: null, source: { kind: 'text', text: decoded.text } }
}
