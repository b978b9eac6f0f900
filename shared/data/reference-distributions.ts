// Measured product distributions the shared library starts with, each with its source. The
// class model (n·r per carbon class) cannot see a halogen already on the chain, which slows
// abstraction at the carbons near it (an inductive effect; common practice); a reference
// distribution is what a run of such a substrate is judged against instead. Plain data.
import type { LibraryReagent } from '../types/library'

export interface SeededReference {
  /** The teaching substrate's id (shared/data/teaching-substrates.ts). */
  substrate: string
  reagent: LibraryReagent
  /** Any SMILES spelling; stored canonical. */
  percents: Array<{ smiles: string, percent: number }>
  source: string
  sourceKind: 'published' | 'from-memory'
}

export const SEEDED_REFERENCES: readonly SeededReference[] = [
  {
    substrate: '1-chlorobutane',
    reagent: 'so2cl2-azo',
    // 1,1- : 1,2- : 1,3- : 1,4-dichlorobutane, rounded to whole percent.
    percents: [
      { smiles: 'ClC(Cl)CCC', percent: 6 },
      { smiles: 'ClCC(Cl)CC', percent: 23 },
      { smiles: 'ClCCC(Cl)C', percent: 46 },
      { smiles: 'ClCCCCCl', percent: 25 },
    ],
    // The paper used a peroxide initiator; the chain carrier (a chlorine atom) is the same with AIBN.
    // The shares are recalled (from memory, rounded): sourceKind says so; the source line is the reference.
    source: 'H. C. Brown and A. B. Ash, J. Am. Chem. Soc. 77 (1955): SO2Cl2 chlorination of 1-chlorobutane, rounded',
    sourceKind: 'from-memory',
  },
]
