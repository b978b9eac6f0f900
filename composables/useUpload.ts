import { readonly, ref } from 'vue'
import type { InternalApi } from 'nitropack/types'
import type { FlagView, SubmissionStatusName } from '#shared/types/submission'
import type { BadgeTone } from '~/components/base/BaseBadge.vue'
import { MAX_UPLOAD_BYTES, MAX_UPLOAD_WORDS } from '#shared/utils/limits'

// Sending a GC file with a progress bar. fetch() reports no upload progress, so this uses
// XMLHttpRequest and its upload.onprogress. State lives inside each call of useUpload(), never
// at module level (safe under SSR). The helpers below are shared by components/upload/*.

/** GET /api/practicals/:id/my-submissions as the browser receives it, typed from the route. */
export type MySubmissions = InternalApi['/api/practicals/:id/my-submissions']['get']
export type MyVersion = MySubmissions['versions'][number]

export type UploadPhase = 'idle' | 'sending' | 'computing' | 'done' | 'failed'

export interface UploadReply<T> {
  status: number
  body: T
}

/** A refused or failed upload: the server's sentence and, for an unreadable file, its rows. */
export class UploadRefused extends Error {
  constructor(readonly statusCode: number, message: string, readonly rows: Array<{ row: number, message: string }> = []) {
    super(message)
    this.name = 'UploadRefused'
  }
}

/** What the file chooser offers; the server judges the bytes, whatever the name. */
export const UPLOAD_ACCEPT = [
  '.csv', '.tsv', '.txt', '.xlsx', '.cdf', '.nc',
  'text/csv', 'text/plain', 'text/tab-separated-values',
  'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'application/x-netcdf',
].join(',')

/** Why a chosen file will not be sent, or null. The server reads the content, not the name, and judges it again. */
export function chosenFileProblem(file: File): string | null {
  if (/\.xls$/i.test(file.name)) return 'This is an old Excel file (.xls). Save it as .xlsx or CSV and choose that.'
  if (file.size === 0) return 'The file is empty. Export the peak table or trace again.'
  if (file.size > MAX_UPLOAD_BYTES) {
    return `The file is larger than ${MAX_UPLOAD_WORDS}. Export only the peak table, or a trace with fewer points.`
  }
  return null
}

/** One key per chosen file: a retried confirm with it never stores a second version. */
export function newIdempotencyKey(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID()
  const b = crypto.getRandomValues(new Uint8Array(16))
  b[6] = (b[6]! & 0x0f) | 0x40
  b[8] = (b[8]! & 0x3f) | 0x80
  const hex = [...b].map((x) => x.toString(16).padStart(2, '0')).join('')
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`
}

function refusalOf(status: number, text: string): UploadRefused {
  let body: { statusMessage?: string, data?: { rows?: Array<{ row: number, message: string }> } } = {}
  try {
    body = JSON.parse(text)
  } catch { /* not JSON: keep the fixed sentence below */ }
  const message = (body.statusMessage ?? '').replace(/^file: /, '') || `The server could not take the file (error ${status}).`
  return new UploadRefused(status, message, Array.isArray(body.data?.rows) ? body.data.rows : [])
}

export function useUpload() {
  const phase = ref<UploadPhase>('idle')
  /** 0–100 while the bytes go out; null when the browser cannot tell. */
  const percent = ref<number | null>(null)
  let current: XMLHttpRequest | null = null

  function abort() {
    current?.abort()
    current = null
  }

  function send<T>(url: string, file: File, headers: Record<string, string> = {}): Promise<UploadReply<T>> {
    abort()
    return new Promise((resolve, reject) => {
      const xhr = new XMLHttpRequest()
      current = xhr
      const fail = (error: UploadRefused) => {
        current = null
        phase.value = 'failed'
        reject(error)
      }
      xhr.open('POST', url)
      xhr.setRequestHeader('Accept', 'application/json')
      for (const [name, value] of Object.entries(headers)) xhr.setRequestHeader(name, value)
      xhr.upload.onprogress = (event) => {
        percent.value = event.lengthComputable && event.total > 0 ? Math.round((event.loaded / event.total) * 100) : null
      }
      // Every byte is out: the server now reads and computes, which has no progress to show.
      xhr.upload.onload = () => {
        percent.value = 100
        phase.value = 'computing'
      }
      xhr.onload = () => {
        current = null
        if (xhr.status < 200 || xhr.status >= 300) return fail(refusalOf(xhr.status, xhr.responseText))
        try {
          phase.value = 'done'
          resolve({ status: xhr.status, body: JSON.parse(xhr.responseText) as T })
        } catch {
          fail(new UploadRefused(xhr.status, 'The server sent an answer that could not be read. Try again.'))
        }
      }
      xhr.onerror = () => fail(new UploadRefused(0, 'The upload did not reach the server. Check the connection and try again.'))
      xhr.onabort = () => fail(new UploadRefused(0, 'The upload was cancelled.'))
      const form = new FormData()
      form.append('file', file, file.name)
      phase.value = 'sending'
      percent.value = 0
      xhr.send(form)
    })
  }

  function reset() {
    abort()
    phase.value = 'idle'
    percent.value = null
  }

  return { phase: readonly(phase), percent: readonly(percent), send, abort, reset }
}

// ---- Wording shared by the upload components ----------------------------------------------

export const FACTOR_NAMES = { secondaryToPrimary: '2°:1°', tertiaryToPrimary: '3°:1°' } as const

/** A word for each severity: the badge's colour only repeats it. */
export const SEVERITY_BADGES: Record<FlagView['severity'], { label: string, tone: BadgeTone }> = {
  danger: { label: 'Must fix', tone: 'danger' },
  warning: { label: 'Check', tone: 'warning' },
  info: { label: 'Note', tone: 'info' },
}

export const STATUS_TONES: Record<SubmissionStatusName, BadgeTone> = {
  pending: 'neutral',
  accepted: 'ok',
  returned: 'warning',
}

interface ProductLabel { smiles: string, label: string, name?: string | null }

/** What a peak was assigned to, in words ("product b", "solvent", "unassigned"), with the product's name and SMILES. */
export function peakAssignment(
  assignedTo: string | null,
  products: ProductLabel[],
): { label: string, name: string | null, smiles: string | null, tone: BadgeTone } {
  if (assignedTo === null) return { label: 'unassigned', name: null, smiles: null, tone: 'warning' }
  if (assignedTo === 'solvent') return { label: 'solvent', name: null, smiles: null, tone: 'neutral' }
  if (assignedTo === 'starting-material') return { label: 'starting material', name: null, smiles: null, tone: 'neutral' }
  const product = products.find((p) => p.smiles === assignedTo)
  return { label: product ? `product ${product.label}` : 'product', name: product?.name ?? null, smiles: assignedTo, tone: 'ok' }
}

/** "1,3-dichlorobutane (CC(CCCl)Cl)" for text where a component cannot go (chart labels, CSV). */
export const productText = (p: { name?: string | null, smiles: string }) => (p.name ? `${p.name} (${p.smiles})` : p.smiles)

const number = (digits: number) => new Intl.NumberFormat('en', { minimumFractionDigits: digits, maximumFractionDigits: digits })
export const formatPercent = (value: number | null | undefined, digits = 1) =>
  (typeof value === 'number' && Number.isFinite(value) ? `${number(digits).format(value)} %` : '—')
export const formatFixed = (value: number | null | undefined, digits: number) =>
  (typeof value === 'number' && Number.isFinite(value) ? number(digits).format(value) : '—')
