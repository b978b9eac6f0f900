// The one SMILES field every form and route uses: trimmed, and refused when too large for its
// kind before any chemistry library parses it (see shared/utils/lib/smiles-size.ts).
import { z } from 'zod'
import { SMILES_LIMITS, smilesSizeProblem, type SmilesKind } from '../utils/lib/smiles-size'

/** A SMILES of the given kind; `optional` lets an empty string through (the reagent forms' "none"). */
export function smilesField(kind: SmilesKind, { optional = false } = {}) {
  const limit = SMILES_LIMITS[kind]
  return z.string().trim().superRefine((value, ctx) => {
    if (!value && !optional) ctx.addIssue({ code: 'custom', message: 'Enter a SMILES string' })
    const problem = smilesSizeProblem(value, limit)
    if (problem) ctx.addIssue({ code: 'custom', message: problem })
  })
}

export const substrateSmilesSchema = smilesField('substrate')
export const productSmilesSchema = smilesField('product')
