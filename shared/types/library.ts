// The substrate library and halogenation methods: zod schemas shared by the forms and the
// routes, and the API types. No openchemlib here: pages import this file.
import { z } from 'zod'
import type { HazardKey } from '../data/cautions'
import { cautionsForMethod } from '../data/cautions'
import { blockText, casNumberField, lineText, recordIdParam } from './fields'
import { productSmilesSchema, substrateSmilesSchema } from './smiles'

const notes = blockText(4000)

// ── Substrates ────────────────────────────────────────────────────────────────────────────

export const substratePreviewSchema = z.object({ smiles: substrateSmilesSchema })
export type SubstratePreviewInput = z.infer<typeof substratePreviewSchema>

// Plain fields without defaults: a PATCH must not reset what it does not mention.
const substrateShape = {
  name: lineText(120, 'Name the substrate'),
  smiles: substrateSmilesSchema,
  density: z.number({ error: 'Enter the density as a number' }).finite()
    .gt(0, 'The density must be above 0 g/mL').max(25, 'At most 25 g/mL').nullable(),
  boilingPointC: z.number({ error: 'Enter the boiling point as a number' }).finite()
    .min(-273.15, 'Below absolute zero').max(1000, 'At most 1000 °C').nullable(),
  notes,
  /** CAS Registry Number, optional; the check digit is verified. */
  casNumber: casNumberField(),
  /** Where the density and boiling point come from. */
  source: lineText(300),
}

type PhysicalData = { density?: number | null, boilingPointC?: number | null, source?: string }

/** Physical data without a source cannot be checked later; a bare structure needs none. */
export function substrateSourceIssue(value: PhysicalData): string | null {
  const hasData = (value.density ?? null) !== null || (value.boilingPointC ?? null) !== null
  return hasData && !value.source?.trim() ? 'Say where the density and boiling point come from' : null
}

export const substrateInputSchema = z.object({
  ...substrateShape,
  density: substrateShape.density.default(null),
  boilingPointC: substrateShape.boilingPointC.default(null),
  casNumber: substrateShape.casNumber.default(null),
  notes: notes.default(''),
  source: substrateShape.source.default(''),
}).superRefine((value, ctx) => {
  const issue = substrateSourceIssue(value)
  if (issue) ctx.addIssue({ code: 'custom', path: ['source'], message: issue })
})
export type SubstrateInput = z.input<typeof substrateInputSchema>

/** PATCH: any of the fields; the source rule is checked by the route against the merged row. */
export const substratePatchSchema = z.object(substrateShape).partial().refine((v) => Object.keys(v).length > 0, 'Change at least one field')
export type SubstratePatch = z.input<typeof substratePatchSchema>

export const WINDOW_KINDS = ['product', 'solvent', 'starting-material'] as const
export type WindowKindName = (typeof WINDOW_KINDS)[number]
export const WINDOW_KIND_LABELS: Record<WindowKindName, string> = {
  'product': 'Product',
  'solvent': 'Solvent',
  'starting-material': 'Starting material',
}

const minutes = (what: string) => z.number({ error: `Enter the ${what} in minutes` }).finite()
  .min(0, 'Must be 0 min or later').max(600, 'At most 600 min')

export const windowInputSchema = z.object({
  kind: z.enum(WINDOW_KINDS),
  productSmiles: productSmilesSchema.optional(),
  /** A name for a solvent or starting-material window ("dichloromethane"); products are lettered. */
  label: lineText(60).optional(),
  rtMin: minutes('window start'),
  rtMax: minutes('window end'),
  responseFactor: z.number({ error: 'Enter the response factor as a number' }).finite()
    .gt(0, 'Must be above 0').max(100, 'At most 100').default(1),
}).superRefine((w, ctx) => {
  if (w.rtMax <= w.rtMin) ctx.addIssue({ code: 'custom', path: ['rtMax'], message: 'The window must end after it starts' })
  if (w.kind === 'product' && !w.productSmiles) {
    ctx.addIssue({ code: 'custom', path: ['productSmiles'], message: 'Name the product (SMILES)' })
  }
  if (w.kind !== 'product' && w.productSmiles) {
    ctx.addIssue({ code: 'custom', path: ['productSmiles'], message: 'Only product windows name a product' })
  }
})
export type WindowInput = z.input<typeof windowInputSchema>

/** A product's name as the instructor types it; empty means "use the built-in name, if any". */
export const productNameSchema = z.object({
  productSmiles: productSmilesSchema,
  name: lineText(120),
})
export type ProductNameInput = z.input<typeof productNameSchema>

export const windowsInputSchema = z.object({
  windows: z.array(windowInputSchema).max(80, 'At most 80 windows'),
  /** Names of the substrate's products (chloro and bromo), saved with the windows; absent leaves them as they are. */
  names: z.array(productNameSchema).max(80, 'At most 80 names').optional(),
}).superRefine(({ windows }, ctx) => {
  for (const kind of ['solvent', 'starting-material'] as const) {
    const extra = windows.findIndex((w, i) => w.kind === kind && windows.findIndex((o) => o.kind === kind) !== i)
    if (extra >= 0) {
      const message = `Only one ${WINDOW_KIND_LABELS[kind].toLowerCase()} window`
      ctx.addIssue({ code: 'custom', path: ['windows', extra, 'kind'], message })
    }
  }
})
export type WindowsInput = z.input<typeof windowsInputSchema>

export type CarbonClassKey = 'primary' | 'secondary' | 'tertiary'

export interface LibraryProduct {
  /** The letter that marks the position in the depiction. */
  label: string
  /** Canonical SMILES of the monochlorination product. */
  smiles: string
  /** Canonical SMILES of the monobromination product at the same position. */
  brominated: string
  /** Names of the two products: the instructor's, else the built-in IUPAC name; null when neither. */
  name: string | null
  brominatedName: string | null
  hydrogens: number
  carbonClass: CarbonClassKey
}

export interface SubstratePreview {
  canonicalSmiles: string
  formula: string
  molarMass: number
  products: LibraryProduct[]
  depictionSvg: string
}

export interface SubstrateListItem {
  id: number
  name: string
  smiles: string
  formula: string
  molarMass: number
  density: number | null
  boilingPointC: number | null
  casNumber: string | null
  /** Part of the shared library (no owner): read-only for everyone. */
  shared: boolean
  /** Created by the caller: theirs to edit and delete. */
  mine: boolean
  windowCount: number
  /** Practicals that use it. */
  usedBy: number
}

export interface SubstrateWindowView {
  id: number
  kind: WindowKindName
  productSmiles: string | null
  /** Position letter of the product (null for solvent and starting material). */
  position: string | null
  /** 'Cl' or 'Br' for product windows: which halogenation's product the window holds. */
  halogen: 'Cl' | 'Br' | null
  label: string
  rtMin: number
  rtMax: number
  responseFactor: number
}

export interface StandardPeak {
  retentionTime: number
  area: number
  areaPercent?: number
  height?: number
  row?: number
}

export interface StandardRunView {
  id: number
  fileName: string
  sha256: string
  byteSize: number
  uploadedBy: string | null
  createdAt: string
  peaks: StandardPeak[]
}

export interface SubstrateDetail extends SubstrateListItem {
  notes: string
  source: string
  products: LibraryProduct[]
  /** Reference distributions, one per reagent family at most. */
  references: ReferenceView[]
  windows: SubstrateWindowView[]
  depictionSvg: string
  standardRuns: StandardRunView[]
  createdAt: string
  updatedAt: string
}

export interface WindowSuggestionView {
  peakIndex: number
  rt: number
  area: number
  suggestedWindow: { rtMin: number, rtMax: number }
  /** The saved window that already holds this peak, if any: a starting point for the mapping. */
  current: { kind: WindowKindName, productSmiles: string | null } | null
}

export interface StandardRunUploadResponse {
  id: number
  fileName: string
  sha256: string
  peaks: StandardPeak[]
  suggestions: WindowSuggestionView[]
  warnings: string[]
}

// ── Methods ───────────────────────────────────────────────────────────────────────────────

export const METHOD_REAGENTS = ['cl2-light', 'so2cl2-azo', 'br2-light', 'nbs'] as const
export type LibraryReagent = (typeof METHOD_REAGENTS)[number]

export const METHOD_REAGENT_LABELS: Record<LibraryReagent, string> = {
  'cl2-light': 'Chlorine and light',
  'so2cl2-azo': 'Sulfuryl chloride with an azo initiator',
  'br2-light': 'Bromine and light',
  'nbs': 'N-Bromosuccinimide',
}

/** The halogen each reagent puts on the substrate. */
export const REAGENT_HALOGEN: Record<LibraryReagent, 'Cl' | 'Br'> = {
  'cl2-light': 'Cl',
  'so2cl2-azo': 'Cl',
  'br2-light': 'Br',
  'nbs': 'Br',
}

export function methodCautions(reagent: LibraryReagent): HazardKey[] {
  return cautionsForMethod(reagent)
}

const reactivity = (cls: string, min: 'positive' | 'zero') => {
  const base = z.number({ error: `Enter the ${cls} reactivity as a number` }).finite().max(1_000_000, 'At most 1 000 000')
  return min === 'positive' ? base.gt(0, 'Must be above 0') : base.min(0, 'Must be 0 or more')
}

const methodShape = {
  name: lineText(120, 'Name the method'),
  reagent: z.enum(METHOD_REAGENTS, { error: 'Choose a reagent' }),
  /** Follows from the reagent; sent for clarity and checked against it. */
  halogen: z.enum(['Cl', 'Br']).optional(),
  temperatureC: z.number({ error: 'Enter the temperature in °C' }).finite().min(-100, 'At least −100 °C').max(400, 'At most 400 °C'),
  reactivity: z.object({
    primary: reactivity('primary', 'positive'),
    secondary: reactivity('secondary', 'zero'),
    tertiary: reactivity('tertiary', 'zero'),
  }),
  source: blockText(500, 'Say where the reactivities come from (a paper, a handbook, your own standard runs, or “textbook value”)'),
  notes,
}

/** Why a halogen does not go with a reagent, or null when it does. */
export function halogenMismatch(reagent: LibraryReagent, halogen: 'Cl' | 'Br' | undefined): string | null {
  const right = REAGENT_HALOGEN[reagent]
  if (!halogen || halogen === right) return null
  return `${METHOD_REAGENT_LABELS[reagent]} gives ${right === 'Cl' ? 'chlorides' : 'bromides'}; choose ${right}`
}

const halogenMatches = (value: { reagent?: LibraryReagent, halogen?: 'Cl' | 'Br' }, ctx: z.RefinementCtx) => {
  const issue = value.reagent ? halogenMismatch(value.reagent, value.halogen) : null
  if (issue) ctx.addIssue({ code: 'custom', path: ['halogen'], message: issue })
}

export const methodInputSchema = z.object({ ...methodShape, notes: notes.default('') }).superRefine(halogenMatches)
export type MethodInput = z.input<typeof methodInputSchema>
export const methodPatchSchema = z.object(methodShape).partial()
  .superRefine(halogenMatches)
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field')

export interface MethodView {
  id: number
  name: string
  reagent: LibraryReagent
  halogen: 'Cl' | 'Br'
  temperatureC: number
  reactivity: { primary: number, secondary: number, tertiary: number }
  source: string
  notes: string
  shared: boolean
  mine: boolean
  usedBy: number
  createdAt: string
  updatedAt: string
}

export const CARBON_CLASS_SHORT: Record<CarbonClassKey, string> = { primary: '1°', secondary: '2°', tertiary: '3°' }

// ── Reference distributions ───────────────────────────────────────────────────────────────

export const REFERENCE_SOURCE_KINDS = ['published', 'from-memory', 'course-results', 'other'] as const
export type ReferenceSourceKindName = (typeof REFERENCE_SOURCE_KINDS)[number]
export const REFERENCE_SOURCE_KIND_LABELS: Record<ReferenceSourceKindName, string> = {
  'published': 'Published (paper, handbook)',
  'from-memory': 'Recalled from memory',
  'course-results': 'This course’s own earlier results',
  'other': 'Other',
}

export const referenceParamsSchema = z.object({
  id: recordIdParam(),
  reagent: z.enum(METHOD_REAGENTS, { error: 'Not a reagent family' }),
})

/** Percentages must add up to 100 within this many points (rounded figures, means of runs). */
export const REFERENCE_SUM_TOLERANCE = 1

export const referenceInputSchema = z.object({
  percents: z.array(z.object({
    productSmiles: productSmilesSchema,
    percent: z.number({ error: 'Enter the mol % as a number' }).finite().min(0, 'Must be 0 % or more').max(100, 'At most 100 %'),
  })).min(1, 'Give the mol % of each product').max(40, 'At most 40 products'),
  source: lineText(500, 'Say where the distribution comes from (a paper, the course’s earlier results, or “textbook value”)'),
  sourceKind: z.enum(REFERENCE_SOURCE_KINDS, { error: 'Choose what kind of source it is' }),
}).superRefine((value, ctx) => {
  const sum = value.percents.reduce((s, p) => s + p.percent, 0)
  if (Math.abs(sum - 100) > REFERENCE_SUM_TOLERANCE) {
    ctx.addIssue({
      code: 'custom',
      path: ['percents'],
      message: `The percentages add up to ${sum.toFixed(1)} %; make them add up to 100 %`,
    })
  }
})
export type ReferenceInput = z.input<typeof referenceInputSchema>

export interface ReferenceView {
  reagent: LibraryReagent
  halogen: 'Cl' | 'Br'
  percents: Array<{ smiles: string, percent: number }>
  source: string
  sourceKind: ReferenceSourceKindName
  updatedBy: string | null
  updatedAt: string
}

/** A practical whose accepted results can fill a reference distribution. */
export interface ReferenceCandidate {
  practicalId: number
  title: string
  courseCode: string
  term: string
  reagent: LibraryReagent
  methodName: string
  /** Accepted results counted (each work unit's latest accepted version, not excluded). */
  n: number
  /** Mean mol % per product over those results. */
  percents: Array<{ smiles: string, percent: number }>
  /** A source line to start from. */
  source: string
}
