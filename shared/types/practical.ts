import { z } from 'zod'
import { ITEM_ROLE_LABELS, ITEM_ROLES } from './lib/labels'
import { smilesField } from './smiles'
import type { HazardKey } from '../data/cautions'
import { blockText, casNumberField, dateField, instantField, lineText, recordId } from './fields'

// Practicals: which substrate and method, which sections run it at which meeting, and what one
// work unit (a pair at a hood station, or one student) uses. Forms and routes share these schemas.

export const WORK_UNITS = ['pair', 'student'] as const
export type WorkUnit = (typeof WORK_UNITS)[number]
export const WORK_UNIT_LABELS: Record<WorkUnit, string> = {
  pair: 'Per pair (one hood station)',
  student: 'Per student',
}

// The roles and their labels live in lib/labels.ts (zod-free, for pages that only show them).
export { ITEM_ROLE_LABELS, ITEM_ROLES }
export type ItemRoleName = (typeof ITEM_ROLES)[number]

export const ITEM_BASES = ['mmol', 'equivalents', 'mol-percent', 'mL', 'g'] as const
export type ItemBasisName = (typeof ITEM_BASES)[number]
export const ITEM_BASIS_LABELS: Record<ItemBasisName, string> = {
  'mmol': 'mmol',
  'equivalents': 'equiv (of substrate)',
  'mol-percent': 'mol % (of substrate)',
  'mL': 'mL',
  'g': 'g',
}
/** Bases that count moles relative to the substrate's mmol. */
export const RELATIVE_BASES: readonly ItemBasisName[] = ['equivalents', 'mol-percent']

const text = (max: number, message: string) => lineText(max, message)
const id = (message: string) => recordId(message)
const optionalPositive = (what: string) => z.number().finite().positive(`${what} must be above zero`).max(100_000).nullable().default(null)

export const practicalInputSchema = z.object({
  title: text(160, 'Enter a title'),
  substrateId: id('Pick a substrate'),
  methodId: id('Pick a method'),
  workUnit: z.enum(WORK_UNITS).default('pair'),
  notes: blockText(4000).default(''),
})
export type PracticalInput = z.input<typeof practicalInputSchema>

export const practicalPatchSchema = z.object({
  title: text(160, 'Enter a title').optional(),
  substrateId: id('Pick a substrate').optional(),
  methodId: id('Pick a method').optional(),
  workUnit: z.enum(WORK_UNITS).optional(),
  notes: blockText(4000).optional(),
})
export type PracticalPatch = z.input<typeof practicalPatchSchema>

export const sessionInputSchema = z.object({
  sectionId: id('Pick a section'),
  meetingDate: dateField(),
  /** An instant (ISO 8601 with offset); default: 7 days after the meeting, 23:59 course time. */
  dueAt: instantField('Use an ISO 8601 date and time').nullable().optional(),
})
export const sessionsInputSchema = z.object({
  sessions: z.array(sessionInputSchema).max(100, 'At most 100 sessions'),
}).superRefine((value, ctx) => {
  const seen = new Set<number>()
  value.sessions.forEach((s, i) => {
    if (seen.has(s.sectionId)) {
      ctx.addIssue({ code: 'custom', path: ['sessions', i, 'sectionId'], message: 'This section already has a meeting for this practical' })
    }
    seen.add(s.sectionId)
  })
})
export type SessionsInput = z.input<typeof sessionsInputSchema>

export const itemInputSchema = z.object({
  role: z.enum(ITEM_ROLES),
  name: text(120, 'Name the item'),
  smiles: smilesField('reagent', { optional: true }).nullable().default(null)
    .transform((v) => (v ? v : null)),
  molarMass: optionalPositive('The molar mass'),
  density: optionalPositive('The density'),
  basis: z.enum(ITEM_BASES),
  amount: z.number({ error: 'Enter an amount' }).finite().min(0, 'Must be zero or more').max(100_000, 'At most 100 000'),
  casNumber: casNumberField().default(null),
}).superRefine((item, ctx) => {
  if (item.role === 'substrate' && RELATIVE_BASES.includes(item.basis)) {
    ctx.addIssue({ code: 'custom', path: ['basis'], message: 'The substrate is the reference: give it in mmol, g or mL' })
  }
  if ((item.basis === 'mmol' || RELATIVE_BASES.includes(item.basis)) && item.molarMass === null && !item.smiles) {
    ctx.addIssue({ code: 'custom', path: ['molarMass'], message: 'Amounts in moles need a molar mass or a SMILES' })
  }
})
export type ItemInput = z.input<typeof itemInputSchema>

export const itemsInputSchema = z.object({
  items: z.array(itemInputSchema).min(1, 'List at least the substrate').max(30, 'At most 30 items'),
}).superRefine((value, ctx) => {
  const substrates = value.items.filter((i) => i.role === 'substrate').length
  if (substrates !== 1) {
    const message = substrates ? 'Only one item can be the substrate' : 'One item must be the substrate'
    ctx.addIssue({ code: 'custom', path: ['items'], message })
  }
})
export type ItemsInput = z.input<typeof itemsInputSchema>

// ---- Answers -------------------------------------------------------------------------------

/** GET /api/courses/:id/practicals (public contract; fields after `meetingDates` are additions). */
export interface PracticalListItem {
  id: number
  title: string
  substrateSmiles: string
  /** The method's name. */
  method: string
  /** The sections the caller may see that run it, and each one's meeting date (same order). */
  sectionIds: number[]
  meetingDates: string[]
  substrateName: string
  methodReagent: string
  workUnit: WorkUnit
  /** The course's zone: meeting and due times are shown in it. */
  timezone: string
  sessions: SessionView[]
}

export interface SessionView {
  sectionId: number
  sectionCode: string
  meetingDate: string
  /** UTC instants of the meeting, ISO 8601 (null if the date is no longer a meeting). */
  start: string | null
  end: string | null
  room: string
  dueAt: string
}

export interface ItemView {
  id?: number
  position: number
  role: ItemRoleName
  name: string
  smiles: string | null
  molarMass: number | null
  density: number | null
  basis: ItemBasisName
  amount: number
  /** CAS Registry Number, optional: kept across an edit of the scale. */
  casNumber?: string | null
}

export interface QuantityView {
  role: ItemRoleName
  name: string
  smiles: string | null
  basis: ItemBasisName
  amount: number
  /** null when the item has no molar mass (a wash, a drying agent given in g). */
  mmol: number | null
  grams: number | null
  /** null without a density; always null for a gas. */
  millilitres: number | null
  gas: boolean
}

export interface QuantitiesView {
  substrateMmol: number | null
  items: QuantityView[]
  /** Why a quantity could not be worked out, one sentence per item. */
  problems: string[]
}

export interface WindowView {
  productSmiles: string
  rtMin: number
  rtMax: number
  responseFactor: number
}

export interface ReferenceWindowView {
  kind: 'solvent' | 'starting-material'
  label: string
  rtMin: number
  rtMax: number
}

export interface MethodSummary {
  id: number
  name: string
  reagent: string
  halogen: 'Cl' | 'Br'
  temperatureC: number
  source: string
}

/** GET /api/practicals/:id (public contract; fields after `dueAt` are additions). */
export interface PracticalDetail {
  id: number
  title: string
  substrate: { name: string, smiles: string, id: number, molarMass: number, density: number | null }
  method: string
  windows: WindowView[]
  dueAt: string | null
  courseId: number
  courseCode: string
  timezone: string
  workUnit: WorkUnit
  notes: string
  methodDetail: MethodSummary
  referenceWindows: ReferenceWindowView[]
  sessions: SessionView[]
  items: ItemView[]
  /** The caller's relation to the course. */
  role: 'owner' | 'ta' | 'coordinator' | 'student'
  canManage: boolean
}

export interface ExpectedProduct {
  smiles: string
  /** The letter marking its position in the substrate's depiction (a, b, c …). */
  position: string
  /** The product's name from the substrate's window label, when that is more than the letter. */
  name: string | null
  hydrogens: number
  carbonClass: 'primary' | 'secondary' | 'tertiary'
  percent: number
  window: { rtMin: number, rtMax: number, responseFactor: number } | null
}

/** GET /api/practicals/:id/card */
export interface ProcedureCardView {
  practical: { id: number, title: string, workUnit: WorkUnit, notes: string }
  course: { id: number, code: string, title: string, timezone: string }
  /** 'student': the caller's own meeting and station; 'staff': every visible session, per work unit. */
  audience: 'student' | 'staff'
  student: { name: string, sectionCode: string, station: number | null, seat: number | null, partners: string[] } | null
  sessions: SessionView[]
  substrate: { name: string, smiles: string, molarMass: number, density: number | null }
  method: MethodSummary
  quantities: QuantitiesView
  products: ExpectedProduct[]
  referenceWindows: ReferenceWindowView[]
  dueAt: string | null
  hazards: HazardKey[]
  planningNote: string
  /** The substrate drawn with its positions lettered (server-made SVG). */
  depictionSvg: string
}

export const PLANNING_NOTE =
  'These quantities are planning aids worked out from the practical\u2019s scale, not a procedure. Your institution\u2019s chemical hygiene plan, the supplier\u2019s safety data sheets and your instructor\u2019s written procedure govern.'

/**
 * Bench-card figures: milligram / microlitre resolution below 10 (0.926 g, 1.045 mL), three
 * significant figures above; '—' for none.
 */
export function formatFigure(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  const magnitude = Math.floor(Math.log10(Math.abs(value)))
  const decimals = Math.abs(value) < 10 ? Math.max(digits, digits - 1 - magnitude) : Math.max(0, digits - 1 - magnitude)
  return value.toFixed(Math.min(decimals, 6))
}

/** Grams under 0.1 g read better as mg on a bench card. */
export function formatMass(grams: number | null | undefined): string {
  if (grams === null || grams === undefined || !Number.isFinite(grams)) return '—'
  return grams > 0 && grams < 0.1 ? `${formatFigure(grams * 1000)} mg` : `${formatFigure(grams)} g`
}

export function formatBasis(amount: number, basis: ItemBasisName): string {
  switch (basis) {
    case 'equivalents': return `${trimmed(amount)} equiv`
    case 'mol-percent': return `${trimmed(amount)} mol %`
    default: return `${trimmed(amount)} ${basis}`
  }
}

/** What the instructor typed, without float noise: 1, 0.5, 2.25. */
function trimmed(value: number): string {
  return String(Number(value.toPrecision(6)))
}

/** `:id` in a route path. */

/** An instant as the course's wall clock: { date: 'YYYY-MM-DD', time: 'HH:MM' }. */
export function wallClock(iso: string, timezone: string): { date: string, time: string } {
  const parts = Object.fromEntries(new Intl.DateTimeFormat('en-CA', {
    timeZone: timezone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', hourCycle: 'h23',
  }).formatToParts(new Date(iso)).map((p) => [p.type, p.value]))
  return { date: `${parts.year}-${parts.month}-${parts.day}`, time: `${parts.hour}:${parts.minute}` }
}
