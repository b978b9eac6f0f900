// Which selectivity a practical is about, and where its value is read: the one home of the rule
// (pages, the review queue, class results, digests and the cross-term comparison all ask here).

/** The per-H factor a practical leads with. */
export type KeyFactor = 'secondaryToPrimary' | 'tertiaryToPrimary'

/** 3°:1° when the substrate has a tertiary C–H, else 2°:1°. */
export function keyFactorOf(products: ReadonlyArray<{ carbonClass: string }>): KeyFactor {
  return products.some((p) => p.carbonClass === 'tertiary') ? 'tertiaryToPrimary' : 'secondaryToPrimary'
}

/** Where a submission row stores each factor (its factor_secondary and factor_tertiary columns). */
export const KEY_FACTOR_COLUMN = { secondaryToPrimary: 'factorSecondary', tertiaryToPrimary: 'factorTertiary' } as const

/** The key factor's value from a stored submission row. */
export function keyFactorValue<T>(row: { factorSecondary: T, factorTertiary: T }, key: KeyFactor): T {
  return row[KEY_FACTOR_COLUMN[key]]
}
