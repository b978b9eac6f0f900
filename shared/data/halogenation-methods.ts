// Halogenation methods the product offers, each with its per-H reactivities, the temperature
// they apply at and where the numbers come from. Plain data: no openchemlib import, so pages
// that list methods stay light.
import type { Halogen, Reactivity } from '../utils/halogenation'

export type SourceKind = 'published' | 'from-memory' | 'derived' | 'common-practice'

export interface MethodReagent {
  name: string
  smiles: string
  role: 'halogenating agent' | 'initiator'
  /** g/mL near 20 °C; null for gases and solids. */
  density: number | null
  densitySource: string | null
}

export interface HalogenationMethod {
  id: string
  /** The key a method row stores (methods.reagent): the reagent family, whatever the initiator. */
  reagent: 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs'
  name: string
  halogen: Halogen
  reagents: MethodReagent[]
  /** Relative reactivity per H, primary = 1. */
  reactivity: Reactivity
  temperatureC: number
  source: string
  sourceKind: SourceKind
  note: string
}

const HANDBOOK = 'CRC Handbook of Chemistry and Physics, table of physical constants of inorganic compounds'
const CHLORINE: MethodReagent = { name: 'chlorine', smiles: 'ClCl', role: 'halogenating agent', density: null, densitySource: null }
const AIBN: MethodReagent = {
  name: 'azobisisobutyronitrile (AIBN)', smiles: 'CC(C)(C#N)N=NC(C)(C)C#N', role: 'initiator', density: null, densitySource: null,
}

export const HALOGENATION_METHODS: readonly HalogenationMethod[] = [
  {
    id: 'cl2-light',
    reagent: 'cl2-light',
    name: 'Chlorine and light',
    halogen: 'Cl',
    reagents: [CHLORINE],
    reactivity: { primary: 1, secondary: 3.8, tertiary: 5.0 },
    temperatureC: 25,
    source: 'NCERT Chemistry class XI worked example',
    sourceKind: 'published',
    note: 'Relative reactivity per H at 25 °C.',
  },
  {
    id: 'br2-light',
    reagent: 'br2-light',
    name: 'Bromine and light',
    halogen: 'Br',
    // Density and the per-H values are from memory (sourceKind says so); readers see the reference.
    reagents: [{ name: 'bromine', smiles: 'BrBr', role: 'halogenating agent', density: 3.10, densitySource: HANDBOOK }],
    reactivity: { primary: 1, secondary: 82, tertiary: 1600 },
    temperatureC: 125,
    source: 'textbook value (relative reactivity per H of bromine atoms, about 125 °C)',
    sourceKind: 'from-memory',
    note: 'Relative reactivity per H at about 125 °C.',
  },
  {
    id: 'so2cl2-aibn',
    reagent: 'so2cl2-azo',
    name: 'Sulfuryl chloride with AIBN',
    halogen: 'Cl',
    reagents: [
      {
        name: 'sulfuryl chloride', smiles: 'O=S(=O)(Cl)Cl', role: 'halogenating agent',
        // From memory.
        density: 1.67, densitySource: HANDBOOK,
      },
      AIBN,
    ],
    // 1 : 3.8 : 5.0 at 25 °C scaled to 80 °C by r(T) = r(T0)^(T0/T).
    reactivity: { primary: 1, secondary: 3.09, tertiary: 3.89 },
    temperatureC: 80,
    source: 'derived from the chlorine-and-light values scaled to 80 °C (common practice: the chlorine atom carries the chain in both)',
    sourceKind: 'derived',
    note: 'No measured per-H values are on file for this method; replace them with your own standard-run results.',
  },
  {
    id: 'nbs-aibn',
    reagent: 'nbs',
    name: 'N-Bromosuccinimide with AIBN',
    halogen: 'Br',
    reagents: [
      { name: 'N-bromosuccinimide', smiles: 'O=C1CCC(=O)N1Br', role: 'halogenating agent', density: null, densitySource: null },
      AIBN,
    ],
    // 1 : 82 : 1600 at 125 °C scaled to 77 °C by r(T) = r(T0)^(T0/T).
    reactivity: { primary: 1, secondary: 150, tertiary: 4399 },
    temperatureC: 77,
    source: 'derived from the bromine-and-light values scaled to 77 °C (common practice: the bromine atom carries the chain in both)',
    sourceKind: 'derived',
    note: 'No measured per-H values are on file for this method; replace them with your own standard-run results.',
  },
]

export function findMethod(id: string): HalogenationMethod | undefined {
  return HALOGENATION_METHODS.find((m) => m.id === id)
}

/** The reference method of a database reagent key. */
export function methodForReagent(reagent: string): HalogenationMethod | undefined {
  return HALOGENATION_METHODS.find((m) => m.reagent === reagent)
}
