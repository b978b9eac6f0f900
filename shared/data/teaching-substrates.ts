// Substrates offered as presets. Molar masses are not stored: molarMassOf(smiles) computes them
// from IUPAC atomic weights. Physical data are recalled values and say so.
export interface TeachingSubstrate {
  id: string
  name: string
  smiles: string
  /** g/mL near 20 °C; null when the compound is a gas at room temperature. */
  density: number | null
  boilingPointC: number
  source: string
}

// Densities and boiling points recalled from the handbook (from memory; see tests/unit for the checks
// made against it). The source line people read names the handbook and its table.
const CRC = 'CRC Handbook of Chemistry and Physics, table of physical constants of organic compounds'
const CHECKED = CRC

export const TEACHING_SUBSTRATES: readonly TeachingSubstrate[] = [
  { id: 'propane', name: 'propane', smiles: 'CCC', density: null, boilingPointC: -42.1, source: CRC },
  { id: 'butane', name: 'butane', smiles: 'CCCC', density: null, boilingPointC: -0.5, source: CRC },
  { id: '2-methylpropane', name: '2-methylpropane', smiles: 'CC(C)C', density: null, boilingPointC: -11.7, source: CRC },
  { id: '2-methylbutane', name: '2-methylbutane', smiles: 'CCC(C)C', density: 0.62, boilingPointC: 27.8, source: CRC },
  { id: 'pentane', name: 'pentane', smiles: 'CCCCC', density: 0.626, boilingPointC: 36.1, source: CRC },
  { id: '1-chlorobutane', name: '1-chlorobutane', smiles: 'CCCCCl', density: 0.886, boilingPointC: 78.4, source: CHECKED },
  { id: '2,3-dimethylbutane', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', density: 0.662, boilingPointC: 58.0, source: CHECKED },
  { id: '2,2-dimethylbutane', name: '2,2-dimethylbutane', smiles: 'CCC(C)(C)C', density: 0.649, boilingPointC: 49.7, source: CRC },
  { id: 'hexane', name: 'hexane', smiles: 'CCCCCC', density: 0.659, boilingPointC: 68.7, source: CRC },
  { id: 'heptane', name: 'heptane', smiles: 'CCCCCCC', density: 0.684, boilingPointC: 98.4, source: CRC },
  {
    id: '2,2,4-trimethylpentane', name: '2,2,4-trimethylpentane', smiles: 'CC(C)CC(C)(C)C',
    density: 0.692, boilingPointC: 99.2, source: CRC,
  },
  { id: 'cyclohexane', name: 'cyclohexane', smiles: 'C1CCCCC1', density: 0.779, boilingPointC: 80.7, source: CRC },
  { id: 'methylcyclohexane', name: 'methylcyclohexane', smiles: 'CC1CCCCC1', density: 0.769, boilingPointC: 100.9, source: CRC },
]

export function findTeachingSubstrate(id: string): TeachingSubstrate | undefined {
  return TEACHING_SUBSTRATES.find((s) => s.id === id)
}
