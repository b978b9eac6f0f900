// The stockroom: reagent catalog, lots and usage, the forecast, order sheets. Zod schemas shared
// by the forms and the routes, and the API types. No openchemlib here: pages import this file.
import { z } from 'zod'
import { smilesField } from './smiles'
import type { HazardKey } from '../data/cautions'
import { forecastEndProblem } from './lib/date-range'
import { blockText, calendarDateProblem, casNumberField, dateField, lineText, recordId, recordIdParam } from './fields'

export const PHYSICAL_STATES = ['solid', 'liquid', 'gas', 'solution'] as const
export type PhysicalStateName = (typeof PHYSICAL_STATES)[number]
export const PHYSICAL_STATE_LABELS: Record<PhysicalStateName, string> = {
  solid: 'Solid',
  liquid: 'Liquid',
  gas: 'Gas (cylinder)',
  solution: 'Solution',
}

export const STOCK_UNITS = ['g', 'mL'] as const
export type StockUnitName = (typeof STOCK_UNITS)[number]
export const ORDER_UNITS = ['g', 'mL', 'each'] as const
export type OrderUnitName = (typeof ORDER_UNITS)[number]

export const SIGNAL_WORDS = ['Danger', 'Warning'] as const
export type SignalWord = (typeof SIGNAL_WORDS)[number]

/** The caution keys a reagent can carry (shown with <SafetyCautions>). */
export const REAGENT_HAZARDS = [
  'chlorine', 'sulfuryl-chloride', 'bromine', 'azo-initiator', 'n-bromosuccinimide', 'halogenated-waste', 'light-source',
] as const satisfies readonly HazardKey[]
export const REAGENT_HAZARD_LABELS: Record<(typeof REAGENT_HAZARDS)[number], string> = {
  'chlorine': 'Chlorine gas',
  'sulfuryl-chloride': 'Sulfuryl chloride',
  'bromine': 'Bromine',
  'azo-initiator': 'Azo initiator',
  'n-bromosuccinimide': 'N-Bromosuccinimide',
  'halogenated-waste': 'Halogenated waste',
  'light-source': 'Photochemical lamp',
}

export const ORDER_STATUSES = ['draft', 'sent', 'received'] as const
export type OrderStatusName = (typeof ORDER_STATUSES)[number]
export const ORDER_STATUS_LABELS: Record<OrderStatusName, string> = {
  draft: 'Being prepared',
  sent: 'Requested',
  received: 'Received',
}

export const SDS_NOTE = 'Hazard statements are entered by hand: confirm them against the supplier\u2019s safety data sheet.'

/**
 * GHS hazard statement codes: H2xx physical, H3xx health, H4xx environmental hazards, alone or
 * combined with "+" (H301+H311). Supplemental national codes (EUH…) are not GHS and stay in the notes.
 */
export const HAZARD_CODE = /^H[2-4]\d{2}(\+H[2-4]\d{2})*$/

/** "H225, h304;H315" → ['H225', 'H304', 'H315'] (the form's text box). */
export function parseHazardCodes(text: string): string[] {
  return text.split(/[\s,;]+/).map((c) => c.trim().toUpperCase()).filter(Boolean)
}

const isoDate = () => dateField()
const text = (max: number) => lineText(max)
const positive = (what: string, max: number) => z.number({ error: `Enter ${what} as a number` }).finite()
  .gt(0, `${what[0]!.toUpperCase()}${what.slice(1)} must be above zero`)
  .max(max, `At most ${max}`)
const email = z.string().trim().toLowerCase().email('Enter an e-mail address').max(254)

// ── Reagents ────────────────────────────────────────────────────────────────────────────

const reagentShape = {
  name: lineText(120, 'Name the reagent'),
  /** When given, the formula and molar mass are worked out from it (IUPAC standard atomic weights). */
  smiles: smilesField('reagent', { optional: true }).nullable().transform((v) => (v ? v : null)),
  /** CAS Registry Number, optional; the check digit is verified. */
  casNumber: casNumberField(),
  formula: text(60),
  molarMass: positive('the molar mass', 100_000).nullable(),
  physicalState: z.enum(PHYSICAL_STATES, { error: 'Pick a physical state' }),
  density: positive('the density', 25).nullable(),
  containerSize: positive('the container size', 1_000_000),
  unit: z.enum(STOCK_UNITS, { error: 'Pick g or mL' }),
  supplierName: text(120),
  supplierEmail: email.nullable().or(z.literal('').transform(() => null)),
  catalogNumber: text(60),
  signalWord: z.enum(SIGNAL_WORDS).nullable(),
  hazardCodes: z.array(z.string().trim().toUpperCase()
    .max(60, 'Use at most 60 characters')
    .regex(HAZARD_CODE, 'Hazard statements look like H225 or H301+H311'))
    .max(30, 'At most 30 hazard statements')
    .transform((codes) => [...new Set(codes)]),
  hazards: z.array(z.enum(REAGENT_HAZARDS)).max(REAGENT_HAZARDS.length).transform((keys) => [...new Set(keys)]),
  storageNotes: blockText(1000),
  shelfLifeMonths: z.number({ error: 'Enter the shelf life in whole months' }).int('Whole months')
    .min(1, 'At least 1 month').max(240, 'At most 240 months').nullable(),
  overagePercent: z.number({ error: 'Enter the overage as a number' }).finite().min(0, 'At least 0 %').max(200, 'At most 200 %'),
  lowStockLevel: z.number({ error: 'Enter the level as a number' }).finite()
    .min(0, 'Zero or more').max(1_000_000, 'At most 1 000 000').nullable(),
}

type ReagentRuleInput = { physicalState?: PhysicalStateName, unit?: StockUnitName, signalWord?: SignalWord | null, hazardCodes?: string[] }

/** Rules across fields; also checked by PATCH against the merged row. */
export function reagentRuleIssues(v: ReagentRuleInput): Array<{ field: string, message: string }> {
  const issues: Array<{ field: string, message: string }> = []
  if (v.physicalState === 'gas' && v.unit !== 'g') {
    issues.push({ field: 'unit', message: 'A gas cylinder is stocked and weighed by mass: use g' })
  }
  if (v.physicalState === 'solid' && v.unit === 'mL') issues.push({ field: 'unit', message: 'A solid is stocked by mass: use g' })
  if (v.signalWord && !v.hazardCodes?.length) {
    issues.push({ field: 'hazardCodes', message: 'A signal word goes with at least one hazard statement' })
  }
  return issues
}

export const reagentInputSchema = z.object({
  ...reagentShape,
  smiles: reagentShape.smiles.default(null),
  casNumber: reagentShape.casNumber.default(null),
  formula: reagentShape.formula.default(''),
  molarMass: reagentShape.molarMass.default(null),
  density: reagentShape.density.default(null),
  supplierName: reagentShape.supplierName.default(''),
  supplierEmail: reagentShape.supplierEmail.default(null),
  catalogNumber: reagentShape.catalogNumber.default(''),
  signalWord: reagentShape.signalWord.default(null),
  hazardCodes: reagentShape.hazardCodes.default([]),
  hazards: reagentShape.hazards.default([]),
  storageNotes: reagentShape.storageNotes.default(''),
  shelfLifeMonths: reagentShape.shelfLifeMonths.default(null),
  overagePercent: reagentShape.overagePercent.default(15),
  lowStockLevel: reagentShape.lowStockLevel.default(null),
}).superRefine((value, ctx) => {
  for (const issue of reagentRuleIssues(value)) ctx.addIssue({ code: 'custom', path: [issue.field], message: issue.message })
})
export type ReagentInput = z.input<typeof reagentInputSchema>

export const reagentPatchSchema = z.object(reagentShape).partial().refine((v) => Object.keys(v).length > 0, 'Change at least one field')
export type ReagentPatch = z.input<typeof reagentPatchSchema>

// ── Lots and usage ──────────────────────────────────────────────────────────────────────

export const lotInputSchema = z.object({
  lotCode: text(60).default(''),
  quantity: positive('the quantity', 10_000_000),
  unit: z.enum(STOCK_UNITS, { error: 'Pick g or mL' }),
  containers: z.number().int('Whole containers').min(1, 'At least one container').max(1000, 'At most 1000').default(1),
  location: text(120).default(''),
  receivedOn: isoDate(),
  openedOn: isoDate().nullable().default(null),
  /** Empty: received date + the reagent's shelf life, when it has one. */
  expiresOn: isoDate().nullable().default(null),
}).superRefine((lot, ctx) => {
  if (lot.openedOn && lot.openedOn < lot.receivedOn) {
    ctx.addIssue({ code: 'custom', path: ['openedOn'], message: 'Opened before it was received?' })
  }
  if (lot.expiresOn && lot.expiresOn < lot.receivedOn) {
    ctx.addIssue({ code: 'custom', path: ['expiresOn'], message: 'The expiry is before the received date' })
  }
})
export type LotInput = z.input<typeof lotInputSchema>

export const lotPatchSchema = z.object({
  lotCode: text(60),
  location: text(120),
  openedOn: isoDate().nullable(),
  expiresOn: isoDate().nullable(),
}).partial().refine((v) => Object.keys(v).length > 0, 'Change at least one field')
export type LotPatch = z.input<typeof lotPatchSchema>

export const usageInputSchema = z.object({
  usedOn: isoDate(),
  amount: positive('the amount', 10_000_000),
  note: text(300).default(''),
  practicalId: recordId('Pick a practical from the list').nullable().default(null),
})
export type UsageInput = z.input<typeof usageInputSchema>

// ── Links from practical items ──────────────────────────────────────────────────────────

export const itemLinkInputSchema = z.object({
  reagentId: recordId('Pick a reagent from the list').nullable(),
  /**
   * When the item is a solution made up with water from the reagent (a solid): its strength in
   * percent w/v, g of the solid per 100 mL of solution. 5 means 5 g made up to 100 mL.
   */
  percentWv: z.number({ error: 'Enter the strength in % w/v as a number' }).finite()
    .gt(0, 'A strength in % w/v must be above zero').max(100, 'At most 100 % w/v (100 g per 100 mL)')
    .nullable().default(null),
})
export type ItemLinkInput = z.input<typeof itemLinkInputSchema>

/** The coordinator says a proposed link is wrong: it is not proposed again. */
export const linkDismissSchema = z.object({ reagentId: recordId('Pick a reagent from the list') })

// ── Forecast ────────────────────────────────────────────────────────────────────────────

export { FORECAST_MAX_DAYS } from './lib/date-range'

export const forecastQuerySchema = z.object({
  from: isoDate(),
  to: isoDate(),
  courseId: recordIdParam().optional(),
}).superRefine((q, ctx) => forecastRangeIssue(q, ctx))

/** The end of a forecast range: on or after its start, at most FORECAST_MAX_DAYS later. */
function forecastRangeIssue(q: { from?: string, to?: string }, ctx: z.RefinementCtx) {
  if (!q.from || !q.to || calendarDateProblem(q.from) || calendarDateProblem(q.to)) return
  const problem = forecastEndProblem(q.from, q.to)
  if (problem) ctx.addIssue({ code: 'custom', path: ['to'], message: problem })
}
export type ForecastQuery = z.input<typeof forecastQuerySchema>

export interface ForecastWeekAmount {
  /** Monday of the ISO week, 'YYYY-MM-DD'. */
  week: string
  required: number
}

/** One reagent of GET /api/stockroom/forecast (contract fields first; the rest are additions). */
export interface ForecastLine {
  reagentId: number
  name: string
  unit: StockUnitName
  required: number
  onHand: number
  shortfall: number
  containers: number
  containerSize: number
  overagePercent: number
  /** containers × containerSize. */
  orderQuantity: number
  weeks: ForecastWeekAmount[]
  /** Needed by meetings between today and the start of the range: drawn from stock first. */
  reservedEarlier: number
  /** On the shelf but not counted: lots that expire before they would be used. */
  notCounted: number
  supplierName: string
  hazards: HazardKey[]
  /** Items made up with water from this solid: the solution the range needs, and its strength. */
  solutions: ForecastSolution[]
}

/** A prepared solution counted as its solid; the water it is made up with is not stock. */
export interface ForecastSolution {
  name: string
  percentWv: number
  /** mL of solution in the range (with the reagent's overage); about as much water, not stocked. */
  solutionMl: number
}

export interface ForecastWeek {
  week: string
  /** ISO 8601 week label, '2026-W49'. */
  isoWeek: string
  sessions: number
  halogenatedWasteMl: number
}

export interface ForecastSession {
  practicalId: number
  practicalTitle: string
  courseId: number
  courseCode: string
  sectionId: number
  sectionCode: string
  meetingDate: string
  week: string
  students: number
  units: number
  workUnit: 'pair' | 'student'
  halogenatedWasteMl: number
}

export interface SkippedSession {
  practicalId: number
  practicalTitle: string
  courseCode: string
  sectionCode: string
  meetingDate: string
  reason: string
}

export interface UnlinkedItem {
  practicalItemId: number
  practicalId: number
  practicalTitle: string
  courseCode: string
  role: string
  name: string
  /** How the item's amount is given: only an item in mL can be a prepared solution. */
  basis: string
  /** The item's CAS Registry Number, when it carries one. */
  casNumber: string | null
  /** A catalog reagent with the same structure, CAS number or name, if there is one: proposed, linked only when confirmed. */
  suggestedReagentId: number | null
  suggestedReagentName: string | null
  /** Why it is proposed. */
  suggestedBecause: 'structure' | 'cas' | 'name' | null
}

export interface ForecastAnswer {
  lines: ForecastLine[]
  halogenatedWasteMl: number
  from: string
  to: string
  weeks: ForecastWeek[]
  sessions: ForecastSession[]
  skippedSessions: SkippedSession[]
  unlinkedItems: UnlinkedItem[]
  /** Why something could not be counted, one sentence each. */
  problems: string[]
  rinseMlPerUnit: number
  wasteRule: string
  planningNote: string
}

export const WASTE_RULE =
  'Halogenated waste, a planning estimate: for each work unit, the volume of the organic liquids of the procedure (substrate, liquid halogenating agent, solvents; they leave as a halogenated mixture) plus the rinse allowance per unit. Aqueous washes, drying agents and gases are not counted.'

export const STOCK_PLANNING_NOTE =
  'Planning figures from the schedule and the current enrolment, not a procedure. Your institution\u2019s chemical hygiene plan and local rules govern storage, handling and waste.'

// ── Order sheets ────────────────────────────────────────────────────────────────────────

export const orderCreateSchema = z.object({
  title: text(160).optional(),
  /** Both given: the sheet starts with the forecast's shortfalls for that range. */
  from: isoDate().optional(),
  to: isoDate().optional(),
}).superRefine((v, ctx) => {
  if (Boolean(v.from) !== Boolean(v.to)) {
    ctx.addIssue({ code: 'custom', path: [v.from ? 'to' : 'from'], message: 'Give both ends of the range, or neither' })
  } else {
    forecastRangeIssue(v, ctx)
  }
})
export type OrderCreateInput = z.input<typeof orderCreateSchema>

export const orderLineInputSchema = z.object({
  reagentId: recordId('Pick a reagent from the list').nullable().default(null),
  name: lineText(160, 'Name what to order'),
  supplierName: text(120).default(''),
  supplierEmail: email.nullable().or(z.literal('').transform(() => null)).default(null),
  catalogNumber: text(60).default(''),
  containers: z.number({ error: 'Enter how many containers' }).int('Whole containers').min(1, 'At least one').max(10_000, 'At most 10 000'),
  containerSize: positive('the container size', 1_000_000),
  unit: z.enum(ORDER_UNITS, { error: 'Pick g, mL or each' }),
  note: text(300).default(''),
})
export type OrderLineInput = z.input<typeof orderLineInputSchema>

export const orderPatchSchema = z.object({
  title: lineText(160, 'Give the sheet a title').optional(),
  notes: blockText(2000).optional(),
  /** For the stockroom only: never in a supplier's message. */
  internalNotes: blockText(2000).optional(),
  lines: z.array(orderLineInputSchema).max(200, 'At most 200 lines').optional(),
}).refine((v) => Object.keys(v).length > 0, 'Change at least one field')
export type OrderPatch = z.input<typeof orderPatchSchema>

export const receiveLineSchema = z.object({
  lineId: recordId('Not a line of this sheet'),
  /** How many containers came; 0: none of this line. */
  containers: z.number({ error: 'Enter how many came' }).int('Whole containers').min(0, 'Zero or more').max(10_000),
  lotCode: text(60).default(''),
  location: text(120).default(''),
  expiresOn: isoDate().nullable().default(null),
})
export const receiveInputSchema = z.object({
  receivedOn: isoDate(),
  lines: z.array(receiveLineSchema).max(200, 'At most 200 lines'),
})
export type ReceiveInput = z.input<typeof receiveInputSchema>

/** What is still open will not come: the order is closed, and the reason kept and shown. */
export const closeOrderSchema = z.object({
  reason: lineText(300, 'Say why the rest will not come'),
})
export type CloseOrderInput = z.input<typeof closeOrderSchema>

export const settingsInputSchema = z.object({
  rinseMlPerUnit: z.number({ error: 'Enter the allowance in mL' }).finite().min(0, 'Zero or more').max(1000, 'At most 1000 mL'),
  deliverTo: blockText(300),
}).partial()
export type SettingsInput = z.input<typeof settingsInputSchema>

// ── Answers ─────────────────────────────────────────────────────────────────────────────

export interface ReagentListItem {
  id: number
  name: string
  formula: string
  physicalState: PhysicalStateName
  unit: StockUnitName
  containerSize: number
  supplierName: string
  signalWord: SignalWord | null
  hazardCodes: string[]
  hazards: HazardKey[]
  /** What is left in lots that have not expired today, in `unit`. */
  inDate: number
  /** What is left in lots already past their expiry. */
  expired: number
  lowStockLevel: number | null
  low: boolean
  lots: number
  nextExpiry: string | null
}

export interface ReagentFields {
  name: string
  smiles: string | null
  casNumber: string | null
  formula: string
  molarMass: number | null
  physicalState: PhysicalStateName
  density: number | null
  containerSize: number
  unit: StockUnitName
  supplierName: string
  supplierEmail: string | null
  catalogNumber: string
  signalWord: SignalWord | null
  hazardCodes: string[]
  hazards: HazardKey[]
  storageNotes: string
  shelfLifeMonths: number | null
  overagePercent: number
  lowStockLevel: number | null
}

export interface LotView {
  id: number
  lotCode: string
  quantity: number
  remaining: number
  unit: StockUnitName
  containers: number
  location: string
  receivedOn: string
  openedOn: string | null
  expiresOn: string | null
  expired: boolean
  orderId: number | null
}

export interface UsageView {
  id: number
  lotId: number
  lotCode: string
  usedOn: string
  amount: number
  unit: StockUnitName
  note: string
  practicalTitle: string | null
  recordedBy: string | null
}

export interface LinkedItemView {
  practicalItemId: number
  practicalId: number
  practicalTitle: string
  courseCode: string
  role: string
  name: string
  /** Made up with water as a solution of this strength (g per 100 mL), or null. */
  percentWv: number | null
}

export interface ReagentDetail extends ReagentFields {
  id: number
  inDate: number
  expired: number
  low: boolean
  lots: LotView[]
  usage: UsageView[]
  linkedItems: LinkedItemView[]
  canManage: boolean
}

export interface OrderLineView {
  id: number
  position: number
  reagentId: number | null
  name: string
  supplierName: string
  supplierEmail: string | null
  catalogNumber: string
  containers: number
  containerSize: number
  unit: OrderUnitName
  note: string
  hazards: HazardKey[]
  /** Containers delivered so far, and still to come (0 once the sheet is received or closed). */
  received: number
  open: number
}

export interface OrderReceiptView {
  id: number
  lineId: number
  receivedOn: string
  containers: number
  lotId: number | null
  receivedBy: string | null
}

export interface OrderSummary {
  id: number
  title: string
  status: OrderStatusName
  lineCount: number
  suppliers: string[]
  forecastFrom: string | null
  forecastTo: string | null
  createdAt: string
  sentAt: string | null
  receivedOn: string | null
  /** Requested, and some of it has come. */
  partlyReceived: boolean
}

export interface OrderDetail extends OrderSummary {
  notes: string
  internalNotes: string
  receipts: OrderReceiptView[]
  /** Lines still open when the coordinator closed the order: why, when, by whom. */
  closedReason: string | null
  closedAt: string | null
  closedBy: string | null
  /** The purchase requests as queued: to whom, and what became of each message. */
  requests: Array<{ supplierEmail: string, supplierName: string, lineCount: number, status: string | null, sentAt: string | null }>
  lines: OrderLineView[]
  createdBy: string | null
  sentBy: string | null
  receivedBy: string | null
  /** Lots created when the sheet was received. */
  lots: Array<{ id: number, reagentId: number, lineId: number | null, quantity: number, unit: StockUnitName }>
  deliverTo: string
}

export interface StockroomSettings {
  rinseMlPerUnit: number
  deliverTo: string
}

export interface StockroomOverview {
  from: string
  to: string
  shortfalls: ForecastLine[]
  halogenatedWasteMl: number
  unlinkedItems: number
  lowStock: ReagentListItem[]
  expiring: Array<{
    lotId: number
    reagentId: number
    reagentName: string
    lotCode: string
    remaining: number
    unit: StockUnitName
    expiresOn: string
    expired: boolean
    location: string
  }>
  orders: OrderSummary[]
}

// The tables' figures live in a zod-free file the forecast page loads on its own.
export { formatContainers, formatStock, solutionWording } from './lib/stock-figures'

// ── Forms ───────────────────────────────────────────────────────────────────────────────

/** The reagent form's values: the hazard statements are one text box. */
export type ReagentFormFields = Omit<ReagentFields, 'hazardCodes'> & { hazardCodesText: string }

export function reagentFormValues(r?: ReagentFields): ReagentFormFields {
  if (!r) {
    return {
      name: '', smiles: '', casNumber: '', formula: '', molarMass: null, physicalState: 'liquid', density: null, containerSize: 100, unit: 'mL',
      supplierName: '', supplierEmail: '', catalogNumber: '', signalWord: null, hazardCodesText: '', hazards: [], storageNotes: '',
      shelfLifeMonths: null, overagePercent: 15, lowStockLevel: null,
    }
  }
  const { hazardCodes, ...rest } = r
  const text = { smiles: r.smiles ?? '', casNumber: r.casNumber ?? '', supplierEmail: r.supplierEmail ?? '' }
  return { ...rest, ...text, hazardCodesText: hazardCodes.join(', ') }
}

/** The body the reagent routes take, from the form's values. */
export function reagentFormBody(values: ReagentFormFields) {
  const { hazardCodesText, ...rest } = values
  return {
    ...rest,
    hazardCodes: parseHazardCodes(hazardCodesText),
    formula: values.smiles ? '' : values.formula,
    molarMass: values.smiles ? null : values.molarMass,
  }
}
