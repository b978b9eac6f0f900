// The stockroom's figures and wording as its tables show them, without zod: the forecast and
// its tables import these from here, so the page does not load the schemas of stockroom.ts (which
// re-exports them). Not auto-imported (a folder below shared/types): import it explicitly.

/** "0.05 g" / "1 250 mL" / "3 × 100 mL": figures for the stockroom's tables. */
export function formatStock(value: number | null | undefined, unit: string, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const abs = Math.abs(value)
  const maximumFractionDigits = abs === 0 ? 0 : abs < 1 ? digits : abs < 10 ? 2 : abs < 100 ? 1 : 0
  return `${new Intl.NumberFormat('en', { maximumFractionDigits }).format(value)} ${unit}`
}

export function formatContainers(containers: number, size: number, unit: string): string {
  return `${containers} × ${formatStock(size, unit)}`
}

/** How a prepared solution reads on a forecast line: "5 % w/v, 5 g per 100 mL, made up with water (water, not stocked)". */
export function solutionWording(percentWv: number): string {
  return `${percentWv} % w/v, ${percentWv} g per 100 mL, made up with water (water, not stocked)`
}
