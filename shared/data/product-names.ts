// Names of the monohalogenation products of the teaching substrates (and, for 1-chlorobutane,
// its dichloro and bromochloro products), keyed by the canonical SMILES openchemlib gives for
// each product. IUPAC substitutive names: the longest chain with the most substituents, lowest
// locants, then the first-cited prefix (alphabetical) gets the lower locant. Stereoisomers are
// not told apart (the product analysis ignores stereo), so 1-chloro-2-methylcyclohexane means
// cis and trans together. tests/unit/product-names.test.ts checks every key against a SMILES
// written independently from its name. An instructor's own name for a product (stored per
// substrate) wins over these. Plain data: no openchemlib import.

const CHLORO: Record<string, string> = {
  // propane
  'CCCCl': '1-chloropropane',
  'CC(C)Cl': '2-chloropropane',
  // butane
  'CCCCCl': '1-chlorobutane',
  'CCC(C)Cl': '2-chlorobutane',
  // 2-methylpropane
  'CC(C)CCl': '1-chloro-2-methylpropane',
  'CC(C)(C)Cl': '2-chloro-2-methylpropane',
  // 2-methylbutane
  'CCC(C)CCl': '1-chloro-2-methylbutane',
  'CCC(C)(C)Cl': '2-chloro-2-methylbutane',
  'CC(C)C(C)Cl': '2-chloro-3-methylbutane',
  'CC(C)CCCl': '1-chloro-3-methylbutane',
  // pentane
  'CCCCCCl': '1-chloropentane',
  'CCCC(C)Cl': '2-chloropentane',
  'CCC(CC)Cl': '3-chloropentane',
  // 1-chlorobutane
  'CCCC(Cl)Cl': '1,1-dichlorobutane',
  'CCC(CCl)Cl': '1,2-dichlorobutane',
  'CC(CCCl)Cl': '1,3-dichlorobutane',
  'ClCCCCCl': '1,4-dichlorobutane',
  // 2,3-dimethylbutane
  'CC(C)C(C)CCl': '1-chloro-2,3-dimethylbutane',
  'CC(C)C(C)(C)Cl': '2-chloro-2,3-dimethylbutane',
  // 2,2-dimethylbutane
  'CCC(C)(C)CCl': '1-chloro-2,2-dimethylbutane',
  'CC(C(C)(C)C)Cl': '3-chloro-2,2-dimethylbutane',
  'CC(C)(C)CCCl': '1-chloro-3,3-dimethylbutane',
  // hexane
  'CCCCCCCl': '1-chlorohexane',
  'CCCCC(C)Cl': '2-chlorohexane',
  'CCCC(CC)Cl': '3-chlorohexane',
  // heptane
  'CCCCCCCCl': '1-chloroheptane',
  'CCCCCC(C)Cl': '2-chloroheptane',
  'CCCCC(CC)Cl': '3-chloroheptane',
  'CCCC(CCC)Cl': '4-chloroheptane',
  // 2,2,4-trimethylpentane
  'CC(C)CC(C)(C)CCl': '1-chloro-2,2,4-trimethylpentane',
  'CC(C)C(C(C)(C)C)Cl': '3-chloro-2,2,4-trimethylpentane',
  'CC(C)(C)CC(C)(C)Cl': '2-chloro-2,4,4-trimethylpentane',
  'CC(CC(C)(C)C)CCl': '1-chloro-2,4,4-trimethylpentane',
  // cyclohexane
  'ClC1CCCCC1': 'chlorocyclohexane',
  // methylcyclohexane
  'ClCC1CCCCC1': '(chloromethyl)cyclohexane',
  'CC1(CCCCC1)Cl': '1-chloro-1-methylcyclohexane',
  'CC(CCCC1)C1Cl': '1-chloro-2-methylcyclohexane',
  'CC(CCC1)CC1Cl': '1-chloro-3-methylcyclohexane',
  'CC(CC1)CCC1Cl': '1-chloro-4-methylcyclohexane',
}

const BROMO: Record<string, string> = {
  'CCCBr': '1-bromopropane',
  'CC(C)Br': '2-bromopropane',
  'CCCCBr': '1-bromobutane',
  'CCC(C)Br': '2-bromobutane',
  'CC(C)CBr': '1-bromo-2-methylpropane',
  'CC(C)(C)Br': '2-bromo-2-methylpropane',
  'CCC(C)CBr': '1-bromo-2-methylbutane',
  'CCC(C)(C)Br': '2-bromo-2-methylbutane',
  'CC(C)C(C)Br': '2-bromo-3-methylbutane',
  'CC(C)CCBr': '1-bromo-3-methylbutane',
  'CCCCCBr': '1-bromopentane',
  'CCCC(C)Br': '2-bromopentane',
  'CCC(CC)Br': '3-bromopentane',
  // 1-chlorobutane brominated: bromo is cited first, so it takes the lower locant only on a tie.
  'CCCC(Cl)Br': '1-bromo-1-chlorobutane',
  'CCC(CCl)Br': '2-bromo-1-chlorobutane',
  'CC(CCCl)Br': '3-bromo-1-chlorobutane',
  'ClCCCCBr': '1-bromo-4-chlorobutane',
  'CC(C)C(C)CBr': '1-bromo-2,3-dimethylbutane',
  'CC(C)C(C)(C)Br': '2-bromo-2,3-dimethylbutane',
  'CCC(C)(C)CBr': '1-bromo-2,2-dimethylbutane',
  'CC(C(C)(C)C)Br': '3-bromo-2,2-dimethylbutane',
  'CC(C)(C)CCBr': '1-bromo-3,3-dimethylbutane',
  'CCCCCCBr': '1-bromohexane',
  'CCCCC(C)Br': '2-bromohexane',
  'CCCC(CC)Br': '3-bromohexane',
  'CCCCCCCBr': '1-bromoheptane',
  'CCCCCC(C)Br': '2-bromoheptane',
  'CCCCC(CC)Br': '3-bromoheptane',
  'CCCC(CCC)Br': '4-bromoheptane',
  'CC(C)CC(C)(C)CBr': '1-bromo-2,2,4-trimethylpentane',
  'CC(C)C(C(C)(C)C)Br': '3-bromo-2,2,4-trimethylpentane',
  'CC(C)(C)CC(C)(C)Br': '2-bromo-2,4,4-trimethylpentane',
  'CC(CC(C)(C)C)CBr': '1-bromo-2,4,4-trimethylpentane',
  'BrC1CCCCC1': 'bromocyclohexane',
  'BrCC1CCCCC1': '(bromomethyl)cyclohexane',
  'CC1(CCCCC1)Br': '1-bromo-1-methylcyclohexane',
  'CC(CCCC1)C1Br': '1-bromo-2-methylcyclohexane',
  'CC(CCC1)CC1Br': '1-bromo-3-methylcyclohexane',
  'CC(CC1)CCC1Br': '1-bromo-4-methylcyclohexane',
}

/** Canonical SMILES → IUPAC name. */
export const BUILT_IN_PRODUCT_NAMES: Readonly<Record<string, string>> = { ...CHLORO, ...BROMO }

/**
 * The built-in name of a product, by its canonical SMILES; null when none is on file. The
 * parameter is not called `canonicalSmiles`: the app's auto-import reads that bare name as the
 * engine function and would pull openchemlib (about 300 kB compressed) into every page that
 * shows a product name.
 */
export function builtInProductName(smiles: string): string | null {
  return Object.hasOwn(BUILT_IN_PRODUCT_NAMES, smiles) ? BUILT_IN_PRODUCT_NAMES[smiles]! : null
}
