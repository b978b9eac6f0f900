import { describe, expect, it } from 'vitest'
import { analyzeSubstrate, canonicalSmiles } from '../../shared/utils/halogenation'
import { TEACHING_SUBSTRATES } from '../../shared/data/teaching-substrates'
import { BUILT_IN_PRODUCT_NAMES, builtInProductName } from '../../shared/data/product-names'

// Each name read back into a structure by hand, spelled differently from the keys (halogen
// first, chains written from the other end), following the IUPAC 2013 rules for substitutive
// names (longest chain with most substituents, lowest locants, then alphabetical order). The
// check: openchemlib's canonical form of this hand-written SMILES is the key the name is filed
// under, so a name keyed to the wrong isomer fails.
const FROM_NAME: Record<string, string> = {
  '1-chloropropane': 'ClCCC',
  '2-chloropropane': 'ClC(C)C',
  '1-chlorobutane': 'ClCCCC',
  '2-chlorobutane': 'ClC(C)CC',
  '1-chloro-2-methylpropane': 'ClCC(C)C',
  '2-chloro-2-methylpropane': 'ClC(C)(C)C',
  '1-chloro-2-methylbutane': 'ClCC(C)CC',
  '2-chloro-2-methylbutane': 'ClC(C)(C)CC',
  '2-chloro-3-methylbutane': 'ClC(C)C(C)C',
  '1-chloro-3-methylbutane': 'ClCCC(C)C',
  '1-chloropentane': 'ClCCCCC',
  '2-chloropentane': 'ClC(C)CCC',
  '3-chloropentane': 'ClC(CC)CC',
  '1,1-dichlorobutane': 'ClC(Cl)CCC',
  '1,2-dichlorobutane': 'ClCC(Cl)CC',
  '1,3-dichlorobutane': 'ClCCC(Cl)C',
  '1,4-dichlorobutane': 'ClCCCCCl',
  '1-chloro-2,3-dimethylbutane': 'ClCC(C)C(C)C',
  '2-chloro-2,3-dimethylbutane': 'ClC(C)(C)C(C)C',
  '1-chloro-2,2-dimethylbutane': 'ClCC(C)(C)CC',
  '3-chloro-2,2-dimethylbutane': 'CC(C)(C)C(Cl)C',
  '1-chloro-3,3-dimethylbutane': 'ClCCC(C)(C)C',
  '1-chlorohexane': 'ClCCCCCC',
  '2-chlorohexane': 'ClC(C)CCCC',
  '3-chlorohexane': 'ClC(CC)CCC',
  '1-chloroheptane': 'ClCCCCCCC',
  '2-chloroheptane': 'ClC(C)CCCCC',
  '3-chloroheptane': 'ClC(CC)CCCC',
  '4-chloroheptane': 'ClC(CCC)CCC',
  '1-chloro-2,2,4-trimethylpentane': 'ClCC(C)(C)CC(C)C',
  '3-chloro-2,2,4-trimethylpentane': 'CC(C)(C)C(Cl)C(C)C',
  '2-chloro-2,4,4-trimethylpentane': 'ClC(C)(C)CC(C)(C)C',
  '1-chloro-2,4,4-trimethylpentane': 'ClCC(C)CC(C)(C)C',
  'chlorocyclohexane': 'C1CCC(Cl)CC1',
  '(chloromethyl)cyclohexane': 'C1CCC(CCl)CC1',
  '1-chloro-1-methylcyclohexane': 'ClC1(C)CCCCC1',
  '1-chloro-2-methylcyclohexane': 'ClC1C(C)CCCC1',
  '1-chloro-3-methylcyclohexane': 'ClC1CC(C)CCC1',
  '1-chloro-4-methylcyclohexane': 'ClC1CCC(C)CC1',
  '1-bromopropane': 'BrCCC',
  '2-bromopropane': 'BrC(C)C',
  '1-bromobutane': 'BrCCCC',
  '2-bromobutane': 'BrC(C)CC',
  '1-bromo-2-methylpropane': 'BrCC(C)C',
  '2-bromo-2-methylpropane': 'BrC(C)(C)C',
  '1-bromo-2-methylbutane': 'BrCC(C)CC',
  '2-bromo-2-methylbutane': 'BrC(C)(C)CC',
  '2-bromo-3-methylbutane': 'BrC(C)C(C)C',
  '1-bromo-3-methylbutane': 'BrCCC(C)C',
  '1-bromopentane': 'BrCCCCC',
  '2-bromopentane': 'BrC(C)CCC',
  '3-bromopentane': 'BrC(CC)CC',
  '1-bromo-1-chlorobutane': 'BrC(Cl)CCC',
  '2-bromo-1-chlorobutane': 'ClCC(Br)CC',
  '3-bromo-1-chlorobutane': 'ClCCC(Br)C',
  '1-bromo-4-chlorobutane': 'BrCCCCCl',
  '1-bromo-2,3-dimethylbutane': 'BrCC(C)C(C)C',
  '2-bromo-2,3-dimethylbutane': 'BrC(C)(C)C(C)C',
  '1-bromo-2,2-dimethylbutane': 'BrCC(C)(C)CC',
  '3-bromo-2,2-dimethylbutane': 'CC(C)(C)C(Br)C',
  '1-bromo-3,3-dimethylbutane': 'BrCCC(C)(C)C',
  '1-bromohexane': 'BrCCCCCC',
  '2-bromohexane': 'BrC(C)CCCC',
  '3-bromohexane': 'BrC(CC)CCC',
  '1-bromoheptane': 'BrCCCCCCC',
  '2-bromoheptane': 'BrC(C)CCCCC',
  '3-bromoheptane': 'BrC(CC)CCCC',
  '4-bromoheptane': 'BrC(CCC)CCC',
  '1-bromo-2,2,4-trimethylpentane': 'BrCC(C)(C)CC(C)C',
  '3-bromo-2,2,4-trimethylpentane': 'CC(C)(C)C(Br)C(C)C',
  '2-bromo-2,4,4-trimethylpentane': 'BrC(C)(C)CC(C)(C)C',
  '1-bromo-2,4,4-trimethylpentane': 'BrCC(C)CC(C)(C)C',
  'bromocyclohexane': 'C1CCC(Br)CC1',
  '(bromomethyl)cyclohexane': 'C1CCC(CBr)CC1',
  '1-bromo-1-methylcyclohexane': 'BrC1(C)CCCCC1',
  '1-bromo-2-methylcyclohexane': 'BrC1C(C)CCCC1',
  '1-bromo-3-methylcyclohexane': 'BrC1CC(C)CCC1',
  '1-bromo-4-methylcyclohexane': 'BrC1CCC(C)CC1',
}

describe('built-in product names', () => {
  it('name every product of every seeded substrate, for chlorination and bromination', () => {
    const unnamed: string[] = []
    for (const substrate of TEACHING_SUBSTRATES) {
      for (const halogen of ['Cl', 'Br'] as const) {
        for (const p of analyzeSubstrate(substrate.smiles, { halogen }).products) {
          if (!builtInProductName(p.smiles)) unnamed.push(`${substrate.name} + ${halogen}: ${p.smiles}`)
        }
      }
    }
    expect(unnamed).toEqual([])
  })

  it('include the four dichlorobutanes of 1-chlorobutane (PRODUCT.md)', () => {
    const names = analyzeSubstrate('ClCCCC', { halogen: 'Cl' }).products.map((p) => builtInProductName(p.smiles)).sort()
    expect(names).toEqual(['1,1-dichlorobutane', '1,2-dichlorobutane', '1,3-dichlorobutane', '1,4-dichlorobutane'])
  })

  it('are keyed by openchemlib\'s canonical SMILES of the structure each name describes', () => {
    for (const [key, name] of Object.entries(BUILT_IN_PRODUCT_NAMES)) {
      expect(canonicalSmiles(key), `${name} is filed under a non-canonical key`).toBe(key)
      expect(FROM_NAME[name], `no structure written for ${name}`).toBeDefined()
      expect(canonicalSmiles(FROM_NAME[name]!), name).toBe(key)
    }
    // Every name is used once, and the table above holds no name the data lacks.
    const names = Object.values(BUILT_IN_PRODUCT_NAMES)
    expect(new Set(names).size).toBe(names.length)
    expect(Object.keys(FROM_NAME).sort()).toEqual([...names].sort())
  })

  it('give nothing for a product not on file, nor for inherited object keys', () => {
    expect(builtInProductName('CCCCCCCCCCl')).toBeNull()
    expect(builtInProductName('constructor')).toBeNull()
  })
})
