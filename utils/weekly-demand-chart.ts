import type { ForecastLine, ForecastWeek, StockUnitName } from '#shared/types/stockroom'
import { displayWeekOf } from '#shared/utils/date-display'

// What the stockroom's weekly demand chart is drawn from (components/stockroom/StockroomWeeklyChart.vue):
// one chart per unit, one bar per reagent side by side, weeks named "week of 30 Nov". Never
// stacked: 30 g of a drying agent on top of 14 g of another solid is a total nobody orders.
// Imports are explicit (and `#shared` resolves in the e2e project too) so the e2e tests build the same data.

// Distinct in lightness as well as hue, and every bar has a legend entry and a tooltip.
const PALETTE = ['#0B1A2B', '#147268', '#BCD22F', '#93B2CA', '#9A3412', '#6FC3B7', '#3A5671', '#E4F08E']

/** The chart's labels, one dataset per reagent measured in `unit`, and its scales. */
export function weeklyDemandChart(lines: ForecastLine[], weeks: ForecastWeek[], unit: StockUnitName) {
  const shown = lines.filter((l) => l.unit === unit)
  const data = {
    labels: weeks.map((w) => displayWeekOf(w.week)),
    datasets: shown.map((line, i) => {
      const byWeek = new Map(line.weeks.map((w) => [w.week, w.required]))
      return {
        label: line.name,
        data: weeks.map((w) => byWeek.get(w.week) ?? 0),
        backgroundColor: PALETTE[i % PALETTE.length],
        borderColor: '#FFFFFF',
        borderWidth: 1,
      }
    }),
  }
  const options = {
    responsive: true,
    maintainAspectRatio: false,
    scales: { x: { stacked: false }, y: { stacked: false, beginAtZero: true, title: { display: true, text: unit } } },
    plugins: { legend: { position: 'bottom' as const } },
  }
  return { names: shown.map((l) => l.name), data, options }
}
