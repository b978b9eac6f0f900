// Every task the engine worker runs, by name: plain data in, plain data out (structured
// cloning carries it across the thread boundary). Nothing here may use Nitro's auto-imports,
// the database or the request: the worker is a separate bundle entry with none of them.
import { analyzeSubstrate, canonicalSmiles, molarMassOf, type Halogen, type SubstrateAnalysis } from '../../shared/utils/halogenation'
import { depictSubstrate, type DepictOptions } from '../../shared/utils/depiction'
import { analyzeRequest, reactivityRequest } from './chemistry'
import { evaluateUpload, evaluateUploadToStore, standardRunPeaks } from './uploads'
import { factorStatistics, outlierReport } from './statistics'
import { classSummary, classSummaryJson } from './class-summary'

export interface ReagentForm {
  smiles: string
  formula: string
  molarMass: number
}

export const ENGINE_TASKS = {
  analyzeRequest,
  reactivityRequest,
  evaluateUpload,
  evaluateUploadToStore,
  standardRunPeaks,
  factorStatistics,
  outlierReport,
  classSummary,
  classSummaryJson,
  substrateAnalysis: ({ smiles, halogen }: { smiles: string, halogen: Halogen }): SubstrateAnalysis =>
    analyzeSubstrate(smiles, { halogen }),
  depictions: (items: Array<{ smiles: string, options: DepictOptions }>): string[] =>
    items.map((i) => depictSubstrate(i.smiles, i.options)),
  /** Canonical SMILES of each, or null for one that cannot be read. */
  canonicalForms: (smiles: string[]): Array<string | null> => smiles.map((s) => {
    try { return canonicalSmiles(s) } catch { return null }
  }),
  /** Canonical SMILES, formula and molar mass of each reagent, or null for one that cannot be read. */
  reagentForms: (smiles: string[]): Array<ReagentForm | null> => smiles.map((s) => {
    try {
      const { formula, molarMass } = molarMassOf(s)
      return { smiles: canonicalSmiles(s), formula, molarMass }
    } catch { return null }
  }),
}

export type EngineTasks = typeof ENGINE_TASKS
export type EngineTaskName = keyof EngineTasks
export type EngineTaskInput<K extends EngineTaskName> = Parameters<EngineTasks[K]>[0]
export type EngineTaskOutput<K extends EngineTaskName> = Awaited<ReturnType<EngineTasks[K]>>

/** Runs a task in the calling thread: the worker's body, and the dev server's stand-in for it. */
export async function runEngineTask<K extends EngineTaskName>(task: K, payload: EngineTaskInput<K>): Promise<EngineTaskOutput<K>> {
  const run = ENGINE_TASKS[task] as (input: EngineTaskInput<K>) => EngineTaskOutput<K> | Promise<EngineTaskOutput<K>>
  if (typeof run !== 'function') throw new Error(`No engine task named ${String(task)}`)
  return await run(payload)
}
