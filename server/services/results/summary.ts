import type { PracticalScope } from '../../utils/access'
import type { PracticalSummary } from '#shared/types/summary'
import type { OutlierSettings } from '#shared/utils/outliers'
import type { OutlierTestName } from '#shared/types/course'
import type { PracticalChemistry } from '#shared/utils/submission'
import { classSummary, classSummaryJson, type ClassSummaryInput, type SummaryChemistry } from '../../engines/class-summary'
import { sizedMemo } from '../../engines/memo'
import { runEngine } from '../../utils/engines'
import { jsonBytes, type JsonBytes } from '../../utils/json-text'
import type { H3Event } from 'h3'
import { requirePracticalAccessWith } from '../../utils/access'
import {
  classColumnsText, practicalFingerprint, practicalFingerprintColumn, practicalFingerprintOf, type PracticalFingerprint,
} from './class-columns'
import { INLINE_RESULTS } from './class-statistics'
import { practicalChemistry, referenceShare } from '../submissions/practical-chemistry'

export interface SummaryOptions { method?: OutlierTestName, withoutOutliers?: boolean, maxOutliers?: number }

/** The parts of a practical's chemistry the summary shows, each product's shares looked up. */
function summaryChemistry(chemistry: PracticalChemistry): SummaryChemistry {
  return {
    products: chemistry.products.map((p) => ({
      smiles: p.smiles,
      label: p.label,
      name: p.name,
      predicted: chemistry.predicted.find((x) => x.smiles === p.smiles)?.percent ?? 0,
      statistical: chemistry.statistical.find((x) => x.smiles === p.smiles)?.percent ?? 0,
      reference: referenceShare(chemistry, p.smiles),
    })),
    has: {
      secondaryToPrimary: chemistry.products.some((p) => p.carbonClass === 'secondary'),
      tertiaryToPrimary: chemistry.products.some((p) => p.carbonClass === 'tertiary'),
    },
    keyFactor: chemistry.keyFactor,
    literature: chemistry.literature,
    literatureSource: chemistry.literatureSource ?? null,
    comparison: { basis: chemistry.expected.basis, description: chemistry.expected.description, factors: chemistry.expected.factors },
  }
}

// Pages read a summary far more often than results change, and at 20,000 results reading the
// rows costs more than everything else. So answers are kept per key, the key naming everything
// the answer is made of: the fingerprints of the class and of the practical's chemistry
// (class-columns.ts: they change with every new, reviewed, returned or excluded version and with
// any edit of the substrate, method, windows, names or references), the sections, the settings
// and the caller's scope. An edit anywhere is a new key, never a stale answer, in every process.
// Bounded by the results held (about 75 bytes of JSON each).
const rememberAnswer = sizedMemo(400_000)

async function summaryAnswer<T>(
  scope: PracticalScope, options: SummaryOptions, form: 'json' | 'object',
  compute: (input: ClassSummaryInput, inline: boolean) => T | Promise<T>,
  fingerprint?: PracticalFingerprint,
): Promise<T> {
  const { practical, course } = scope
  const known = fingerprint ?? await practicalFingerprint(practical)
  const settings: OutlierSettings = {
    test: options.method ?? course.outlierTest,
    alpha: course.outlierAlpha,
    zscoreLimit: course.zscoreLimit,
    maxOutliers: options.maxOutliers ?? null,
  }
  const parts = {
    settings,
    withoutOutliers: options.withoutOutliers ?? false,
    sectionIds: scope.sessionSectionIds,
    reasonsFor: scope.role === 'owner' ? 'all' as const : scope.role === 'ta' ? scope.sectionIds ?? [] : [],
  }
  const key = JSON.stringify([form, practical.id, practical.substrateId, practical.methodId, known.text, parts])
  return rememberAnswer(key, known.versions, async () => {
    // The class is read with its own fingerprint, in one snapshot; both reads are as new as the
    // key or newer, never older.
    const [chemistry, read] = await Promise.all([practicalChemistry(practical), classColumnsText(practical.id)])
    const input: ClassSummaryInput = {
      columns: read.columns, sections: read.sections, fingerprint: read.fingerprint, chemistry: summaryChemistry(chemistry), ...parts,
    }
    return compute(input, read.versions <= INLINE_RESULTS)
  })
}

/**
 * The class-wide selectivity of a practical: every unit's latest accepted-or-pending result,
 * excluded ones left out and listed. The whole class is summarised for everyone who may see
 * the practical; the by-section part holds only the caller's sections.
 */
export function practicalSummary(scope: PracticalScope, options: SummaryOptions): Promise<PracticalSummary> {
  return summaryAnswer(scope, options, 'object', (input, inline) => (inline ? classSummary(input) : runEngine('classSummary', input)))
}

/**
 * The scope of a summary's reader (requirePracticalAccess) and the practical's fingerprint, in
 * one round trip: when the answer is remembered, that is the request's only statement.
 */
export async function requireSummaryAccess(event: H3Event, practicalId: number) {
  const { scope, columns } = await requirePracticalAccessWith(event, practicalId, practicalFingerprintColumn)
  return { scope, fingerprint: practicalFingerprintOf(columns) }
}

/**
 * The same summary as the JSON (UTF-8) the route sends, remembered with its compressed forms
 * (server/utils/json-text.ts): a large class's is written in the engine worker. `fingerprint`:
 * read with the scope (requireSummaryAccess), else read here.
 */
export function practicalSummaryJson(
  scope: PracticalScope, options: SummaryOptions, fingerprint?: PracticalFingerprint,
): Promise<JsonBytes> {
  return summaryAnswer(scope, options, 'json',
    async (input, inline) => jsonBytes(inline ? classSummaryJson(input) : await runEngine('classSummaryJson', input)), fingerprint)
}
