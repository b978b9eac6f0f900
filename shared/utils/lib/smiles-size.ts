// How big a SMILES is, read from the text alone, before any parser sees it. openchemlib's
// parsing and canonical ordering grow faster than linearly with the molecule (a 1,000-carbon
// chain takes over a second here), so a size limit checked after parsing protects nothing.
// Counting atoms in the string costs microseconds and needs no chemistry library, so the
// browser and every route can apply the same limits.

/**
 * Limits per kind of SMILES. A teaching lab halogenates C1 to C12-ish alkanes, cycloalkanes
 * and haloalkanes (common practice); 40 heavy atoms leaves more than three times that, and a
 * monohalogenation product has one atom more than its substrate. 200 characters holds any such
 * substrate even with every atom in brackets ("[CH3]" is five characters for one atom).
 * Reagents (salts, initiators, solvents) are not analysed, only weighed: they get more room.
 */
export const SMILES_LIMITS = {
  substrate: { characters: 200, heavyAtoms: 40 },
  product: { characters: 200, heavyAtoms: 41 },
  reagent: { characters: 400, heavyAtoms: 100 },
} as const

export type SmilesKind = keyof typeof SMILES_LIMITS
export interface SmilesLimit { characters: number, heavyAtoms: number }

// Elements SMILES writes without brackets (the organic subset) and their aromatic forms.
const BARE_ATOMS = new Set(['B', 'C', 'N', 'O', 'P', 'S', 'F', 'I', 'b', 'c', 'n', 'o', 'p', 's', '*'])
// Element symbols that start with H but are not hydrogen.
const H_ELEMENTS = new Set(['He', 'Hf', 'Hg', 'Ho', 'Hs'])

/** Whether a bracket atom's text (between "[" and "]") is a hydrogen: [H], [2H], [H+], [HH]… */
function isBracketHydrogen(inside: string): boolean {
  const symbol = inside.replace(/^\d+/, '')
  return symbol.startsWith('H') && !H_ELEMENTS.has(symbol.slice(0, 2))
}

/**
 * Atoms other than hydrogen written in a SMILES: organic-subset atoms outside brackets (Cl and
 * Br as one), and every bracket atom that is not a hydrogen (isotopes such as [13CH4] count).
 * Ring-closure digits, %nn labels, bonds, branches and dots are not atoms. Text that is not
 * valid SMILES is counted as far as it goes; the parser refuses it later.
 */
export function countHeavyAtoms(smiles: string): number {
  let count = 0
  for (let i = 0; i < smiles.length; i++) {
    const ch = smiles[i]!
    if (ch === '[') {
      const end = smiles.indexOf(']', i + 1)
      const inside = smiles.slice(i + 1, end < 0 ? smiles.length : end)
      if (!isBracketHydrogen(inside)) count++
      i = end < 0 ? smiles.length : end
    } else if (ch === '%') {
      i += 2
    } else if ((ch === 'C' && smiles[i + 1] === 'l') || (ch === 'B' && smiles[i + 1] === 'r')) {
      count++
      i++
    } else if (BARE_ATOMS.has(ch)) {
      count++
    }
  }
  return count
}

/** Why a SMILES is too large for its kind, as a field message; null when it is within limits. */
export function smilesSizeProblem(smiles: string, limit: SmilesLimit): string | null {
  if (smiles.length > limit.characters) return `Too large: at most ${limit.characters} characters`
  const atoms = countHeavyAtoms(smiles)
  if (atoms > limit.heavyAtoms) return `Too large: at most ${limit.heavyAtoms} heavy atoms (this one has ${atoms})`
  return null
}
