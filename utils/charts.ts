import {
  BarElement, CategoryScale, Chart, Legend, LinearScale, LineElement, LogarithmicScale, PointElement, ScatterController, Tooltip, Filler,
} from 'chart.js'

let registered = false

/** Registers only the Chart.js parts the app draws, once; animation stays off (print, screenshots). */
export function useCharts() {
  if (!registered) {
    Chart.register(
      BarElement, CategoryScale, LinearScale, LogarithmicScale, LineElement, PointElement, ScatterController, Tooltip, Legend, Filler,
    )
    Chart.defaults.animation = false
    Chart.defaults.font.family = '"IBM Plex Sans", system-ui, sans-serif'
    Chart.defaults.color = '#2B4560'
    registered = true
  }
}

/** One colour per series, distinct in greyscale too (light, mid-light, mid, dark). */
export const SERIES_COLOURS = {
  statistical: '#BCCDDC',
  reference: '#D08A2E',
  predicted: '#147268',
  observed: '#0B1A2B',
  accent: '#BCD22F',
} as const
