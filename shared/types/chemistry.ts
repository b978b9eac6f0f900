import { z } from 'zod'
import { productSmilesSchema, substrateSmilesSchema } from './smiles'

// Relative reactivities per H run from 1 to a few thousand (bromination's 3° is about 1600); a
// million leaves room and keeps every sum a finite number.
const positive = z.number().finite().min(0, 'Must be zero or more').max(1_000_000, 'At most 1,000,000')

export const reactivitySchema = z.object({
  primary: positive,
  secondary: positive,
  tertiary: positive,
}).refine((r) => r.primary + r.secondary + r.tertiary > 0, { message: 'At least one class must react (above zero)', path: ['primary'] })

export const analyzeInputSchema = z.object({
  smiles: substrateSmilesSchema,
  halogen: z.enum(['Cl', 'Br']).default('Cl'),
  temperatureC: z.number().finite().min(-100).max(400).optional(),
  reactivity: reactivitySchema.optional(),
  /** The temperature custom reactivities were measured at (default 25 °C). */
  referenceTemperatureC: z.number().finite().min(-100).max(400).optional(),
  /** Also draw each product (for the explorer's table). */
  productDepictions: z.boolean().default(false),
})
export type AnalyzeInput = z.input<typeof analyzeInputSchema>

export const reactivityInputSchema = z.object({
  smiles: substrateSmilesSchema,
  observed: z.array(z.object({
    smiles: productSmilesSchema,
    percent: z.number().finite().min(0, 'Must be zero or more').max(100_000),
  })).min(1, 'Enter at least one observed product').max(60),
  reference: productSmilesSchema.optional(),
  /** Which halogenation; read from the observed products when absent. */
  halogen: z.enum(['Cl', 'Br']).optional(),
})
export type ReactivityInput = z.input<typeof reactivityInputSchema>

export type CarbonClassName = 'primary' | 'secondary' | 'tertiary'

export interface AnalyzedProduct {
  /** The letter that marks this position in the depiction. */
  label: string
  smiles: string
  hydrogens: number
  carbonClass: CarbonClassName
  atoms: number[]
  predictedPercent: number
  /** Equal reactivity per H: n_p / Σn. */
  statisticalPercent: number
  depictionSvg?: string
}

export interface AnalyzeResponse {
  canonicalSmiles: string
  formula: string
  molarMass: number
  halogen: 'Cl' | 'Br'
  reactivity: { primary: number, secondary: number, tertiary: number }
  temperatureC: number
  reactivitySource: string
  products: AnalyzedProduct[]
  depictionSvg: string
}

export interface ReactivityResponse {
  products: Array<{ smiles: string, hydrogens: number, carbonClass: CarbonClassName, percent: number, relativeReactivity: number | null }>
  factors: { secondaryToPrimary: number | null, tertiaryToPrimary: number | null }
  factorNotes: { secondaryToPrimary: string | null, tertiaryToPrimary: string | null }
  reference: string
  warnings: string[]
}

/** The explorer's worked example from the caller's own class: a practical's class median mol % per product. */
export interface ClassExample {
  practical: { id: number, title: string, courseCode: string, term: string }
  substrate: { name: string, smiles: string }
  /** Accepted results counted (each work unit's latest, none excluded). */
  n: number
  percents: Array<{ smiles: string, percent: number }>
}
