import { afterEach, describe, expect, it, vi } from 'vitest'
import { Molecule } from 'openchemlib'
import { countHeavyAtoms, SMILES_LIMITS, smilesSizeProblem } from '../../shared/utils/lib/smiles-size'
import { productSmilesSchema, smilesField, substrateSmilesSchema } from '../../shared/types/smiles'
import { analyzeInputSchema, reactivityInputSchema } from '../../shared/types/chemistry'
import { analyzeSubstrate, canonicalSmiles, SubstrateError } from '../../shared/utils/halogenation'

// The size of a SMILES read from its text, before any parser sees it. The reference for each
// count is openchemlib itself (a general chemistry library): the atoms it parses, less hydrogens.
function heavyAtomsByParser(smiles: string): number {
  const mol = Molecule.fromSmiles(smiles)
  let heavy = 0
  for (let a = 0; a < mol.getAllAtoms(); a++) if (mol.getAtomicNo(a) !== 1) heavy++
  return heavy
}

afterEach(() => { vi.restoreAllMocks() })

describe('countHeavyAtoms', () => {
  it.each([
    ['CCC', 3],
    ['ClCCBr', 4], // Cl and Br are one atom each, not C + l
    ['C(Cl)(Cl)Cl', 4],
    ['BrC(Br)CBr', 5],
    ['C1CCCCC1', 6], // ring-closure digits are not atoms
    ['C12CC1CC2', 5],
    ['C%10CCCCC%10', 6], // %nn ring labels
    ['C%12CC%12', 3],
    ['[CH4]', 1], // a bracket atom
    ['[CH3][CH2][CH3]', 3],
    ['[13CH4]', 1], // an isotope is still one heavy atom
    ['[2H]C([2H])([2H])[2H]', 1], // deuterium is hydrogen
    ['[H]C([H])([H])C([H])([H])[H]', 2], // explicit hydrogens do not count
    ['[H][H]', 0],
    ['[C@@H](F)(Cl)Br', 4], // stereo marks inside brackets
    ['C/C=C/Cl', 4], // bond marks
    ['c1ccccc1', 6], // aromatic atoms
    ['[nH]1cccc1', 5],
    ['[Hg](Cl)Cl', 3], // Hg is mercury, not hydrogen
    ['[Na+].[Cl-]', 2],
    ['CC(C)(C)C', 5],
    ['O=S(=O)(Cl)Cl', 5], // sulfuryl chloride
    ['CC(C)(C#N)N=NC(C)(C)C#N', 12], // AIBN
  ])('%s has %i heavy atoms, as openchemlib parses it', (smiles, expected) => {
    expect(countHeavyAtoms(smiles)).toBe(expected)
    expect(heavyAtomsByParser(smiles)).toBe(expected)
  })

  it('counts an unclosed bracket as one atom and leaves the refusal to the parser', () => {
    expect(countHeavyAtoms('C[CH2')).toBe(2)
  })
})

describe('smilesSizeProblem', () => {
  const substrate = SMILES_LIMITS.substrate
  it('allows a substrate of exactly 40 heavy atoms and refuses 41, naming the limit', () => {
    expect(smilesSizeProblem('C'.repeat(40), substrate)).toBeNull()
    expect(smilesSizeProblem('C'.repeat(41), substrate)).toBe('Too large: at most 40 heavy atoms (this one has 41)')
  })

  it('counts atoms, not characters: 40 bracket atoms fit in 200 characters', () => {
    const bracketed = '[CH3]' + '[CH2]'.repeat(38) + '[CH3]'
    expect(bracketed).toHaveLength(200)
    expect(smilesSizeProblem(bracketed, substrate)).toBeNull()
    expect(heavyAtomsByParser(bracketed)).toBe(40)
  })

  it('refuses more than 200 characters before counting', () => {
    expect(smilesSizeProblem(`${'[CH3]'.repeat(40)}C`, substrate)).toBe('Too large: at most 200 characters')
    expect(smilesSizeProblem('C'.repeat(1000), substrate)).toBe('Too large: at most 200 characters')
  })

  it('gives a product one atom more than a substrate', () => {
    expect(smilesSizeProblem(`ClC${'C'.repeat(39)}`, SMILES_LIMITS.product)).toBeNull()
    expect(smilesSizeProblem(`ClC${'C'.repeat(39)}`, substrate)).toMatch(/at most 40 heavy atoms/)
  })
})

describe('the shared SMILES fields', () => {
  it('trim, and ask for a SMILES when empty', () => {
    expect(substrateSmilesSchema.parse('  CCC ')).toBe('CCC')
    expect(substrateSmilesSchema.safeParse('').error?.issues[0]!.message).toBe('Enter a SMILES string')
    expect(smilesField('reagent', { optional: true }).parse('')).toBe('')
  })

  it('refuse 1,000 carbons with one issue that says too large', () => {
    const result = substrateSmilesSchema.safeParse('C'.repeat(1000))
    expect(result.error?.issues).toHaveLength(1)
    expect(result.error?.issues[0]!.message).toMatch(/^Too large: at most 200 characters/)
  })

  it('name the field in the chemistry routes: the substrate and each observed product', () => {
    const analyze = analyzeInputSchema.safeParse({ smiles: 'C'.repeat(150) })
    expect(analyze.error?.issues[0]).toMatchObject({ path: ['smiles'], message: 'Too large: at most 40 heavy atoms (this one has 150)' })
    const observed = Array.from({ length: 10 }, () => ({ smiles: 'C'.repeat(1000), percent: 10 }))
    const reactivity = reactivityInputSchema.safeParse({ smiles: 'CCC', observed })
    expect(reactivity.error?.issues[0]).toMatchObject({ path: ['observed', 0, 'smiles'], message: 'Too large: at most 200 characters' })
    expect(productSmilesSchema.safeParse('ClCCC').success).toBe(true)
  })
})

describe('the engines check the size before parsing', () => {
  it('refuse an oversized SMILES without calling the parser', () => {
    const parse = vi.spyOn(Molecule, 'fromSmiles')
    for (const run of [() => analyzeSubstrate('C'.repeat(1000)), () => canonicalSmiles('C'.repeat(1000)), () => analyzeSubstrate('C'.repeat(41))]) {
      let caught: unknown
      try { run() } catch (e) { caught = e }
      expect(caught).toBeInstanceOf(SubstrateError)
      expect((caught as SubstrateError).code).toBe('too-large')
    }
    expect(parse).not.toHaveBeenCalled()
  })

  it('still parse a substrate at the limit', () => {
    expect(analyzeSubstrate('C'.repeat(40)).products).toHaveLength(20)
  })
})
