import { describe, expect, it } from 'vitest'
import jStat from 'jstat'
import { classSummary, classSummaryJson, type ClassColumns, type ClassSummaryInput, type SummaryChemistry } from '../../server/engines/class-summary'
import { factorStats, type FactorValue } from '../../shared/utils/class-summary'
import { chooseHeadline } from '../../shared/utils/headline'
import { gesdCritical } from '../../shared/utils/gesd'
import type { FactorSet } from '../../shared/types/summary'
import type { OutlierSettings } from '../../shared/utils/outliers'
import type { KeyFactor } from '../../shared/utils/key-factor'

// The summary engine (server/engines/class-summary.ts, fed by one JSON document of columns) must
// give the very answer the route gave before it, when it read one object per result and ran the
// statistics per group. `previousSummary` below is that earlier code, kept as the reference;
// the data are generated (invented, seeded) with outliers, pending runs, exclusions, nulls and
// unreadable stored values. The statistics themselves are checked against published values in
// statistics.test.ts, gesd.test.ts and headline.test.ts.

function random(seed: number) {
  let a = seed
  return () => {
    a = (a + 0x6D2B79F5) | 0
    let t = Math.imul(a ^ (a >>> 15), 1 | a)
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

interface Row {
  submissionId: number
  sectionId: number
  status: 'pending' | 'accepted'
  excluded: boolean
  reason: string | null
  factorSecondary: number | string | null
  factorTertiary: number | string | null
  percents: Array<{ smiles: string, percent: number }>
}

const SECTIONS = [{ id: 11, code: 'A01' }, { id: 12, code: 'A02' }, { id: 13, code: 'B01' }, { id: 14, code: 'B02' }, { id: 15, code: 'C01' }]
const SMILES = ['ClCC(C)C(C)C', 'CC(C)(Cl)C(C)C']

function generate(n: number, seed: number): Row[] {
  const next = random(seed)
  const normal = () => Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next())
  return Array.from({ length: n }, (_, i) => {
    const roll = next()
    // Mostly log-normal around 3.6; a few far off each way (a solvent peak counted, swapped peaks).
    const factor = roll < 0.01 ? 30 + 10 * next() : roll < 0.02 ? 0.05 * next() : Math.exp(Math.log(3.6) + 0.15 * normal())
    const stored = roll > 0.995 ? 'NaN' : roll > 0.99 ? null : Number(factor.toPrecision(6))
    const excluded = next() < 0.03
    const share = 40 + 10 * next()
    return {
      submissionId: 1000 + i,
      sectionId: SECTIONS[Math.floor(next() * SECTIONS.length)]!.id,
      status: next() < 0.3 ? 'pending' : 'accepted',
      excluded,
      reason: excluded ? `Run ${i} spilled` : null,
      factorSecondary: stored,
      factorTertiary: next() < 0.02 ? null : Number((5 + next()).toFixed(4)),
      percents: [{ smiles: SMILES[0]!, percent: share }, { smiles: SMILES[1]!, percent: 100 - share }],
    }
  })
}

/** The document class-columns.ts has PostgreSQL build, for these rows (already in unit order). */
function columnsOf(rows: Row[]): ClassColumns {
  const kept = rows.filter((r) => !r.excluded)
  const excludedRows = rows.filter((r) => r.excluded)
    .map((r) => ({ submissionId: r.submissionId, sectionId: r.sectionId, exclusionReason: r.reason }))
  return {
    ids: rows.map((r) => r.submissionId),
    sectionIds: rows.map((r) => r.sectionId),
    statuses: rows.map((r) => r.status),
    secondary: rows.map((r) => r.factorSecondary),
    tertiary: rows.map((r) => r.factorTertiary),
    excluded: rows.map((r) => r.excluded),
    excludedRows: excludedRows.length ? excludedRows : null,
    percents: SMILES.map((smiles) => ({
      smiles, percents: kept.flatMap((r) => r.percents.filter((p) => p.smiles === smiles).map((p) => p.percent)),
    })),
  }
}

const chemistry = (tertiary: boolean): SummaryChemistry => ({
  products: [
    { smiles: SMILES[0]!, label: 'A', name: 'first', predicted: 45, statistical: 60, reference: null },
    { smiles: SMILES[1]!, label: 'B', name: null, predicted: 55, statistical: 40, reference: null },
  ],
  has: { secondaryToPrimary: true, tertiaryToPrimary: tertiary },
  keyFactor: tertiary ? 'tertiaryToPrimary' : 'secondaryToPrimary',
  literature: { secondaryToPrimary: 3.8, tertiaryToPrimary: tertiary ? 5 : null },
  literatureSource: 'Invented source line',
  comparison: { basis: 'class-model', description: 'the class model', factors: { secondaryToPrimary: 3.8, tertiaryToPrimary: null } },
})

/** The summary as the route computed it before (summary.ts with factorSets, one object per result). */
function previousSummary(rows: Row[], input: ClassSummaryInput) {
  const { chemistry: c, settings, withoutOutliers } = input
  const included = rows.filter((r) => !r.excluded)
  const sections = SECTIONS.filter((s) => input.sectionIds.includes(s.id))
  const keys = (['secondaryToPrimary', 'tertiaryToPrimary'] as const).filter((k) => c.has[k])
  const column = { secondaryToPrimary: 'factorSecondary', tertiaryToPrimary: 'factorTertiary' } as const
  const setOf = (group: Row[]): FactorSet => {
    const unreviewed = new Set(group.filter((r) => r.status === 'pending').map((r) => r.submissionId))
    const of = (key: KeyFactor) => {
      if (!keys.includes(key)) return null
      const values = group.flatMap((r): FactorValue[] => {
        const value = r[column[key]]
        return value === null ? [] : [{ submissionId: r.submissionId, sectionId: r.sectionId, value: value as number }]
      })
      return factorStats(values, settings, { withoutOutliers, unreviewed })
    }
    return { secondaryToPrimary: of('secondaryToPrimary'), tertiaryToPrimary: of('tertiaryToPrimary') }
  }
  const factors = setOf(included)
  const key = factors[c.keyFactor]
  const reads = (sectionId: number) => input.reasonsFor === 'all' || input.reasonsFor.includes(sectionId)
  return {
    n: included.length,
    headline: key ? { factor: c.keyFactor, ...key.headline } : null,
    factors,
    excluded: rows.filter((r) => r.excluded).map((r) => ({
      submissionId: r.submissionId, reason: reads(r.sectionId) ? r.reason ?? '' : 'Left out of the class figures by a reviewer.',
    })),
    bySection: sections.map((s) => {
      const group = included.filter((r) => r.sectionId === s.id)
      return { sectionId: s.id, code: s.code, n: group.length, factors: setOf(group) }
    }),
    keyFactor: c.keyFactor,
    literature: c.literature,
    literatureSource: c.literatureSource,
    withoutOutliers,
    distribution: c.products.map((p) => {
      const xs = included.flatMap((r) => r.percents.filter((m) => m.smiles === p.smiles).map((m) => m.percent))
      return {
        smiles: p.smiles, label: p.label, name: p.name, observed: xs.length ? xs.reduce((a, b) => a + b, 0) / xs.length : null,
        predicted: p.predicted, statistical: p.statistical, reference: p.reference,
      }
    }),
    comparison: c.comparison,
  }
}

const settingsOf = (test: OutlierSettings['test'], maxOutliers: number | null = null): OutlierSettings => ({
  test, alpha: 0.05, zscoreLimit: 3.5, maxOutliers,
})

describe('the class summary engine gives the answer the route gave before', () => {
  const cases: Array<[string, number, OutlierSettings, boolean, boolean]> = [
    ['generalized ESD, 1,500 results', 1500, settingsOf('gesd'), false, false],
    ['generalized ESD, r = 40, without the outliers', 1500, settingsOf('gesd', 40), true, true],
    ['Grubbs, 800 results, two factors', 800, settingsOf('grubbs'), false, true],
    ['Dixon (cannot run on a class)', 300, settingsOf('dixon'), false, false],
    ['modified z-score, 2,000 results', 2000, settingsOf('modified-z'), true, false],
    ['generalized ESD, 9 results', 9, settingsOf('gesd'), false, false],
  ]
  for (const [name, n, settings, withoutOutliers, tertiary] of cases) {
    it(name, () => {
      const rows = generate(n, n + settings.test.length)
      for (const [sectionIds, reasonsFor] of [[SECTIONS.map((s) => s.id), 'all'], [[12, 14], [12]], [[], []]] as const) {
        const input: ClassSummaryInput = {
          columns: JSON.stringify(columnsOf(rows)),
          sections: JSON.stringify(SECTIONS),
          fingerprint: `[${n}, ${name}]`,
          chemistry: chemistry(tertiary),
          settings,
          withoutOutliers,
          sectionIds: [...sectionIds],
          reasonsFor: reasonsFor === 'all' ? 'all' : [...reasonsFor],
        }
        const before = JSON.stringify(previousSummary(rows, input))
        // The same text, byte for byte (keys in the same order), and the same object.
        const text = (bytes: Uint8Array) => new TextDecoder().decode(bytes)
        expect(text(classSummaryJson(input))).toBe(before)
        expect(classSummary(input)).toEqual(JSON.parse(before))
        // Asked again (the figures are remembered per group), still the same.
        expect(text(classSummaryJson(input))).toBe(before)
      }
    })
  }

  it('the headline reuses the summaries it is given and leads as it would alone', () => {
    const rows = generate(500, 7).filter((r) => typeof r.factorSecondary === 'number')
    const values = rows.map((r) => ({ submissionId: r.submissionId, sectionId: r.sectionId, value: r.factorSecondary as number }))
    const stats = factorStats(values, settingsOf('gesd'), { unreviewed: new Set(rows.slice(0, 50).map((r) => r.submissionId)) })
    const alone = chooseHeadline(stats.values.map((v) => v.value), { unreviewedOutliers: stats.headline.unreviewedOutliers })
    expect(stats.headline).toEqual(alone)
    expect(stats.outliers.length).toBeGreaterThan(0)
  })
})

describe('remembered critical values of the generalized ESD test', () => {
  // λ_i from Rosner (1983) as the e-Handbook §1.3.5.17.3 writes it, with jstat's t quantile.
  const lambda = (n: number, i: number, alpha: number) => {
    const t = jStat.studentt.inv(1 - alpha / (2 * (n - i + 1)), n - i - 1)
    return ((n - i) * t) / Math.sqrt((n - i - 1 + t * t) * (n - i + 1))
  }

  it('equal the formula, first asked or remembered, for sizes that share values left', () => {
    for (const [n, i, alpha] of [[54, 1, 0.05], [54, 10, 0.05], [20000, 4000, 0.05], [20001, 4001, 0.05], [30, 3, 0.1]] as const) {
      expect(gesdCritical(n, i, alpha)).toBe(lambda(n, i, alpha))
      expect(gesdCritical(n, i, alpha)).toBe(lambda(n, i, alpha))
    }
    // e-Handbook §1.3.5.17.3, its example of 54 values (table in gesd.test.ts): λ_1 = 3.158794, λ_10 = 3.085425.
    expect(Math.abs(gesdCritical(54, 1, 0.05) - 3.158794)).toBeLessThan(5e-6)
    expect(Math.abs(gesdCritical(54, 10, 0.05) - 3.085425)).toBeLessThan(5e-6)
    // The same values left (n − i + 1 = 45) at another α is another value.
    expect(gesdCritical(54, 10, 0.01)).not.toBe(gesdCritical(54, 10, 0.05))
  })
})
