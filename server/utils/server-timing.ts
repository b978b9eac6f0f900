import type { H3Event } from 'h3'

// Where a request's time goes, sent as a Server-Timing header (W3C Server Timing), which the
// browser's developer tools show and `npm run bench` reads for the upload case. Off unless the
// runtime config's serverTiming is set (NUXT_SERVER_TIMING=1): the durations say how long the
// database and the engines took for this caller, which nobody else needs to know.

/** One metric: a name, its duration in ms and, optionally, a description. */
export interface TimingMetric {
  name: string
  ms: number
  description?: string
}

export interface RequestTiming {
  /** Records the time since the request's handler began under `name`. */
  since(name: string): void
  /** Records how long `work` takes from now under `name`; the promise is passed through. */
  span<T>(name: string, work: Promise<T>): Promise<T>
  /** Records a duration measured elsewhere (the engine worker's own time). */
  add(name: string, ms: number, description?: string): void
  /** Sets the header from what was recorded. */
  send(): void
}

const METRIC_NAME = /^[\w!#$%&'*+.^`|~-]+$/

/** The header's value: `name;dur=1.23;desc="…"` items joined by commas. */
export function serverTimingHeader(metrics: readonly TimingMetric[]): string {
  return metrics.map(({ name, ms, description }) => {
    if (!METRIC_NAME.test(name)) throw new Error(`Server-Timing: "${name}" is not a token`)
    const desc = description === undefined ? '' : `;desc="${description.replace(/["\\]/g, '')}"`
    return `${name};dur=${ms.toFixed(2)}${desc}`
  }).join(', ')
}

/** A timing that records nothing: what every request gets while the setting is off. */
export const noTiming: RequestTiming = {
  since: () => {},
  span: (_name, work) => work,
  add: () => {},
  send: () => {},
}

export function requestTiming(event: H3Event): RequestTiming {
  if (!useRuntimeConfig(event).serverTiming) return noTiming
  const started = performance.now()
  const metrics: TimingMetric[] = []
  return {
    since: (name) => { metrics.push({ name, ms: performance.now() - started, description: 'since the handler began' }) },
    span(name, work) {
      const from = performance.now()
      return work.finally(() => { metrics.push({ name, ms: performance.now() - from }) })
    },
    add: (name, ms, description) => { metrics.push({ name, ms, ...(description ? { description } : {}) }) },
    send: () => { if (metrics.length) setResponseHeader(event, 'server-timing', serverTimingHeader(metrics)) },
  }
}
