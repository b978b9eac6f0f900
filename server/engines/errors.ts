// Errors cross the worker boundary as plain data: structured cloning keeps an Error's message
// but not its class or its own fields (rows, status, code). The engines' input errors are
// written down by name with those fields in the worker and rebuilt as the same class here,
// so routes answer a bad file or a bad SMILES exactly as they did when the engines ran inline.
import { ChemistryInputError, ReactivityInputError, SubstrateError, type SubstrateErrorCode } from '../../shared/utils/halogenation'
import { WindowError } from '../../shared/utils/chromatography'
import { StatisticsError } from '../../shared/utils/statistics'
import { RunInputError, type RowProblem } from '../../shared/utils/submission'
import { TraceError } from '../../shared/utils/lib/peak-detection'
import { UploadFormatError } from '../../shared/utils/lib/upload-content'
import type { RowError } from '../../shared/utils/lib/peak-table'

export interface PlainEngineError {
  name: string
  message: string
  code?: string
  status?: number
  rows?: unknown[]
}

type Rebuild = (e: PlainEngineError) => Error

const REBUILD: Record<string, Rebuild> = {
  ChemistryInputError: (e) => new ChemistryInputError(e.code ?? 'invalid', e.message),
  SubstrateError: (e) => new SubstrateError((e.code ?? 'unparsable') as SubstrateErrorCode, e.message),
  ReactivityInputError: (e) => new ReactivityInputError(e.code ?? 'invalid', e.message),
  RunInputError: (e) => new RunInputError(e.message, (e.rows ?? []) as RowProblem[]),
  UploadFormatError: (e) => new UploadFormatError(e.status === 415 ? 415 : 422, e.message, (e.rows ?? []) as RowError[]),
  WindowError: (e) => new WindowError(e.message),
  StatisticsError: (e) => new StatisticsError(e.message),
  TraceError: (e) => new TraceError(e.message),
}

/** An error thrown by a task, as data that survives postMessage. */
export function toPlainError(error: unknown): PlainEngineError {
  if (!(error instanceof Error)) return { name: 'Error', message: String(error) }
  const fields = error as Error & { code?: unknown, status?: unknown, rows?: unknown }
  return {
    name: error.name,
    message: error.message,
    ...(typeof fields.code === 'string' ? { code: fields.code } : {}),
    ...(typeof fields.status === 'number' ? { status: fields.status } : {}),
    ...(Array.isArray(fields.rows) ? { rows: fields.rows } : {}),
  }
}

/** The engine error a task threw, rebuilt as its own class; anything else becomes a plain Error (a 500). */
export function fromPlainError(plain: PlainEngineError): Error {
  const rebuild = REBUILD[plain.name]
  if (rebuild) return rebuild(plain)
  const error = new Error(plain.message)
  error.name = plain.name
  return error
}
