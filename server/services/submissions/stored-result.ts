import type { StoredResult } from '../../../shared/types/submission'
import type { KeyFactor } from '../../../shared/utils/key-factor'
import type { RunResult } from '../../../shared/utils/submission'

// What a version stores as its result: uploads and the demo seed both write it through here, so a
// seeded version reads like an uploaded one. No Nitro, relative imports: the seed runs outside it.

/** The result as stored with a version: what every later figure is computed from. */
export function storedResultOf(run: Omit<RunResult, 'peaks'>, keyFactor: KeyFactor): StoredResult {
  return {
    molePercents: run.molePercents,
    factors: run.factors,
    relative: run.relative,
    conversion: run.conversion,
    unassignedPercent: run.unassignedPercent,
    warnings: run.warnings,
    keyFactor,
  }
}
