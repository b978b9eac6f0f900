/**
 * At most `limit` tasks at once, and at most `maxWaiting` more queued in arrival order. A
 * finished task hands its place straight to the next in line, so late arrivals cannot overtake.
 */
export class WorkGate {
  private running = 0
  private readonly waiting: Array<() => void> = []

  constructor(readonly limit: number, readonly maxWaiting: number) {}

  /** False when both the slots and the queue are full: refuse the work rather than queue it. */
  hasRoom(): boolean {
    return this.running < this.limit || this.waiting.length < this.maxWaiting
  }

  async run<T>(work: () => Promise<T>): Promise<T> {
    if (this.running < this.limit) this.running++
    else await new Promise<void>((resolve) => this.waiting.push(resolve))
    try {
      return await work()
    } finally {
      const next = this.waiting.shift()
      if (next) next()
      else this.running--
    }
  }
}
