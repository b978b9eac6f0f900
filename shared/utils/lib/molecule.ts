// Molecule parsing, validation, canonical SMILES and molar mass, shared by the halogenation
// engine and the depiction. openchemlib does the graph work; what it accepts leniently
// (unbalanced parentheses, pentavalent carbon) is refused here so that a typo never turns
// into a silently different substrate.
import { Molecule } from 'openchemlib'
import { countHeavyAtoms, SMILES_LIMITS, type SmilesLimit } from './smiles-size'

export type SubstrateErrorCode =
  | 'empty'
  | 'unparsable'
  | 'multiple-molecules'
  | 'unsupported-element'
  | 'charged'
  | 'radical'
  | 'isotope'
  | 'valence'
  | 'unsaturated'
  | 'too-large'
  | 'no-ch'

/** Base class for chemistry input problems whose `message` can be shown to the user as is. */
export class ChemistryInputError extends Error {
  readonly code: string
  constructor(code: string, message: string) {
    super(message)
    this.name = 'ChemistryInputError'
    this.code = code
  }
}

/** The substrate SMILES cannot be analysed; `message` is written for the person who typed it. */
export class SubstrateError extends ChemistryInputError {
  declare readonly code: SubstrateErrorCode
  constructor(code: SubstrateErrorCode, message: string) {
    super(code, message)
    this.name = 'SubstrateError'
  }
}

export const MAX_HEAVY_ATOMS = SMILES_LIMITS.substrate.heavyAtoms
const SUBSTRATE_ELEMENTS = new Set([1, 6, 9, 17, 35, 53])

/**
 * IUPAC (CIAAW) abridged standard atomic weights, the conventional single values for elements
 * whose standard weight is an interval (H, C, N, O, S, Cl, Br …). Recalled from memory and
 * checked against the molar masses in PRODUCT.md (SO2Cl2 134.96, AIBN 164.21). openchemlib's
 * own weights are older (Cl 35.453, S 32.066) and put SO2Cl2 at 134.97, hence this table.
 */
export const STANDARD_ATOMIC_WEIGHTS: Readonly<Record<string, number>> = {
  H: 1.008, Li: 6.94, B: 10.81, C: 12.011, N: 14.007, O: 15.999, F: 18.998, Na: 22.99,
  Mg: 24.305, Al: 26.982, Si: 28.085, P: 30.974, S: 32.06, Cl: 35.45, K: 39.098, Ca: 40.078,
  Cr: 51.996, Mn: 54.938, Fe: 55.845, Cu: 63.546, Zn: 65.38, Br: 79.904, Ag: 107.87,
  Sn: 118.71, I: 126.90447, Hg: 200.59,
}

/** Syntax problems openchemlib would otherwise tolerate; null when none is found. */
export function smilesSyntaxProblem(smiles: string): string | null {
  if (/\s/.test(smiles)) return 'A SMILES string cannot contain spaces.'
  if (!/^[A-Za-z0-9()[\]=#$:/\\@+\-.%*~]+$/.test(smiles)) return 'The SMILES contains characters that SMILES does not use.'
  let depth = 0
  let inBracket = false
  const ringLabels = new Map<string, number>()
  for (let i = 0; i < smiles.length; i++) {
    const ch = smiles[i]!
    if (inBracket) {
      if (ch === '[') return 'Square brackets cannot be nested.'
      if (ch === ']') inBracket = false
      continue
    }
    if (ch === '[') inBracket = true
    else if (ch === ']') return 'A closing bracket "]" has no opening bracket.'
    else if (ch === '(') {
      if (i === 0 || '(.=#'.includes(smiles[i - 1]!)) return 'A branch "(" must follow an atom.'
      if (smiles[i + 1] === ')') return 'The SMILES contains an empty branch "()".'
      depth++
    } else if (ch === ')') {
      if (--depth < 0) return 'A closing parenthesis ")" has no opening one.'
    } else if (/[0-9]/.test(ch)) {
      ringLabels.set(ch, (ringLabels.get(ch) ?? 0) + 1)
    } else if (ch === '%') {
      const label = smiles.slice(i + 1, i + 3)
      if (!/^[0-9]{2}$/.test(label)) return 'A ring label "%" must be followed by two digits.'
      ringLabels.set(`%${label}`, (ringLabels.get(`%${label}`) ?? 0) + 1)
      i += 2
    }
  }
  if (inBracket) return 'A bracket "[" is never closed.'
  if (depth !== 0) return 'A branch "(" is never closed.'
  for (const [label, count] of ringLabels) {
    if (count % 2 !== 0) return `Ring bond ${label} is opened but never closed.`
  }
  if (/^[.=#\-$:/\\]|[.=#\-$:/\\]$|\.\./.test(smiles)) return 'The SMILES starts or ends with a bond or a dot.'
  return null
}

// The routes refuse oversized SMILES in their schemas already; this is the engines' own
// backstop, checked on the text before openchemlib spends time on it. Any SMILES the engines
// read (reagents included) stays within the reagent limit.
function readMolecule(input: string, limit: SmilesLimit = SMILES_LIMITS.reagent): Molecule {
  if (typeof input !== 'string') throw new SubstrateError('empty', 'Enter a SMILES string for the substrate.')
  const smiles = input.trim()
  if (smiles === '') throw new SubstrateError('empty', 'Enter a SMILES string for the substrate.')
  if (smiles.length > limit.characters) {
    throw new SubstrateError('too-large', `That SMILES is too large: at most ${limit.characters} characters.`)
  }
  const atoms = countHeavyAtoms(smiles)
  if (atoms > limit.heavyAtoms) {
    throw new SubstrateError('too-large', `The SMILES is too large: it has ${atoms} heavy atoms; the limit is ${limit.heavyAtoms}.`)
  }
  const problem = smilesSyntaxProblem(smiles)
  if (problem) throw new SubstrateError('unparsable', `That SMILES could not be read: ${problem}`)
  // openchemlib reads the wildcard atom as a carbon query atom.
  if (smiles.includes('*')) {
    throw new SubstrateError('unsupported-element', 'The wildcard atom "*" is not supported: enter a complete structure.')
  }
  let mol: Molecule
  try {
    // Constitutional products are wanted, so stereo is dropped at the door.
    mol = Molecule.fromSmiles(smiles, { noStereo: true })
  } catch (error) {
    const problem = parserProblemInWords(String((error as Error)?.message ?? error))
    throw new SubstrateError('unparsable', `That SMILES could not be read: ${problem}`)
  }
  if (mol.getAllAtoms() === 0) throw new SubstrateError('unparsable', 'That SMILES contains no atoms.')
  mol.stripStereoInformation()
  return mol
}

/** openchemlib's parser messages, in a sentence a student can act on. */
function parserProblemInWords(raw: string): string {
  const detail = raw.replace(/^.*?SmilesParser:\s*/, '')
  const at = detail.match(/Position:\s*(\d+)/)
  const where = at ? ` (at character ${Number(at[1]) + 1})` : ''
  if (/unknown element/i.test(detail)) return `it names an element that does not exist${where}. Write organic-subset atoms as C, Cl, Br, F, I, or in brackets, such as [CH3].`
  if (/ring closure|closure/i.test(detail)) return `a ring-closure digit is not paired${where}.`
  if (/bracket|\]/i.test(detail)) return `a bracket atom is not written correctly${where}, for example [CH2] or [C@H].`
  return `it is not valid SMILES${where}. Check the atoms, brackets and ring-closure digits.`
}

// Every GC result names its products again (a 5,000-row upload spent more time in openchemlib
// than in reading its rows): the answer depends on the text alone, so the last few hundred are kept.
const CANONICAL_KEPT = 512
const canonicalKept = new Map<string, string>()

/** Canonical isomeric SMILES without stereo: any valid SMILES of the same constitution gives the same string. */
export function canonicalSmiles(smiles: string): string {
  const known = canonicalKept.get(smiles)
  if (known !== undefined) return known
  const mol = readMolecule(smiles)
  mol.removeExplicitHydrogens()
  const canonical = mol.toIsomericSmiles()
  if (canonicalKept.size >= CANONICAL_KEPT) canonicalKept.delete(canonicalKept.keys().next().value!)
  canonicalKept.set(smiles, canonical)
  return canonical
}

function label(mol: Molecule, atom: number): string {
  return mol.getAtomLabel(atom)
}

function assertSubstrateAtoms(mol: Molecule): void {
  for (let a = 0; a < mol.getAllAtoms(); a++) {
    const no = mol.getAtomicNo(a)
    if (!SUBSTRATE_ELEMENTS.has(no)) {
      throw new SubstrateError('unsupported-element', `The substrate contains ${label(mol, a)}: only C, H, F, Cl, Br and I are supported.`)
    }
  }
  for (let a = 0; a < mol.getAllAtoms(); a++) {
    const atom = `Atom ${a + 1} (${label(mol, a)})`
    if (mol.getAtomCharge(a) !== 0) throw new SubstrateError('charged', `${atom} carries a charge: enter the neutral substrate.`)
    if (mol.getAtomRadical(a) !== 0) {
      throw new SubstrateError(
        'radical',
        `${atom} is a radical or carbene: enter a closed-shell substrate (check the hydrogen count in brackets).`,
      )
    }
    if (mol.getAtomMass(a) !== 0) throw new SubstrateError('isotope', `${atom} is isotope-labelled: isotope labels are not supported.`)
  }
}

function assertValencesAndBonds(mol: Molecule): void {
  for (let b = 0; b < mol.getAllBonds(); b++) {
    if (mol.getBondOrder(b) !== 1 || mol.isAromaticBond(b)) {
      throw new SubstrateError(
        'unsaturated',
        'The substrate has a double, triple or aromatic bond: only saturated substrates (alkanes, cycloalkanes, haloalkanes) follow the per-H model.',
      )
    }
  }
  for (let a = 0; a < mol.getAtoms(); a++) {
    if (mol.getAtomicNo(a) === 1) continue
    const valence = mol.getConnAtoms(a) + mol.getAllHydrogens(a)
    const expected = mol.getAtomicNo(a) === 6 ? 4 : 1
    if (valence !== expected) {
      const bonds = `${valence} bond${valence === 1 ? '' : 's'}`
      throw new SubstrateError(
        'valence',
        `Atom ${a + 1} (${label(mol, a)}) has ${bonds} but ${label(mol, a)} needs ${expected}: check the hydrogen count or the branches.`,
      )
    }
  }
}

/**
 * Parses and validates a substrate. Heavy-atom indexes of the result are the ones reported in
 * `atoms` by the analysis and used by the depiction, so both must go through this function.
 */
export function parseSubstrateMolecule(smiles: string, limit: SmilesLimit = SMILES_LIMITS.substrate): Molecule {
  const mol = readMolecule(smiles, limit)
  if (mol.getFragments().length > 1) {
    throw new SubstrateError('multiple-molecules', 'The SMILES contains more than one molecule (a "."): enter one substrate.')
  }
  assertSubstrateAtoms(mol)
  mol.removeExplicitHydrogens()
  mol.ensureHelperArrays(Molecule.cHelperSymmetrySimple)
  if (mol.getAtoms() > limit.heavyAtoms) {
    throw new SubstrateError(
      'too-large',
      `The substrate is too large: it has ${mol.getAtoms()} heavy atoms; the limit is ${limit.heavyAtoms}.`,
    )
  }
  let hasCarbon = false
  for (let a = 0; a < mol.getAtoms(); a++) if (mol.getAtomicNo(a) === 6) hasCarbon = true
  if (!hasCarbon) throw new SubstrateError('no-ch', 'The substrate contains no carbon, so it has no C–H bond to halogenate.')
  assertValencesAndBonds(mol)
  let hasCH = false
  for (let a = 0; a < mol.getAtoms(); a++) {
    if (mol.getAtomicNo(a) === 6 && mol.getAllHydrogens(a) > 0) hasCH = true
  }
  if (!hasCH) throw new SubstrateError('no-ch', 'The substrate has no C–H bond, so it cannot be halogenated.')
  return mol
}

export interface FormulaAndMass {
  /** Hill notation: C, then H, then the other elements alphabetically (all alphabetical without carbon). */
  formula: string
  /** g/mol from IUPAC standard atomic weights, rounded to 0.001. */
  molarMass: number
}

export function formulaAndMass(mol: Molecule): FormulaAndMass {
  mol.ensureHelperArrays(Molecule.cHelperNeighbours)
  const counts = new Map<string, number>()
  const add = (el: string, n: number) => counts.set(el, (counts.get(el) ?? 0) + n)
  for (let a = 0; a < mol.getAllAtoms(); a++) {
    if (mol.getAtomMass(a) !== 0) {
      throw new ChemistryInputError('isotope', 'Isotope-labelled atoms have no standard atomic weight.')
    }
    add(mol.getAtomLabel(a), 1)
    const h = mol.getImplicitHydrogens(a) + mol.getExplicitHydrogens(a)
    if (h > 0) add('H', h)
  }
  let mass = 0
  for (const [el, n] of counts) {
    const weight = STANDARD_ATOMIC_WEIGHTS[el]
    if (weight === undefined) throw new ChemistryInputError('unsupported-element', `No standard atomic weight is on file for ${el}.`)
    mass += weight * n
  }
  const order = [...counts.keys()].sort((a, b) => a.localeCompare(b, 'en'))
  const hill = counts.has('C') ? ['C', ...(counts.has('H') ? ['H'] : []), ...order.filter((e) => e !== 'C' && e !== 'H')] : order
  const formula = hill.map((el) => el + (counts.get(el) === 1 ? '' : String(counts.get(el)))).join('')
  return { formula, molarMass: Math.round(mass * 1000) / 1000 }
}

/**
 * Formula and molar mass of any reagent SMILES (salts and charged species included), for the
 * stockroom; unlike a substrate it is not restricted to C, H and halogens.
 */
export function molarMassOf(smiles: string): FormulaAndMass {
  const mol = readMolecule(smiles)
  return formulaAndMass(mol)
}
