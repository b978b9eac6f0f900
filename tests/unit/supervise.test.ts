import { spawn, type ChildProcess } from 'node:child_process'
import { describe, expect, it } from 'vitest'
import { supervise } from '../../scripts/lib/supervise.mjs'

// npm start's supervisor (scripts/lib/supervise.mjs) with its delays scaled down: 1 s → 20 ms,
// 30 s → 100 ms, "ran for a minute" → 2 s (far above a crashing child's life, even on a
// busy machine). The children are real Node processes that exit
// with a code, or live until told to stop. Only the planned delays (the log lines) are checked,
// never how long anything took.

const node = (script: string): ChildProcess => spawn(process.execPath, ['-e', script], { stdio: 'ignore' })

function scaled(plan: Array<'crash' | 'linger' | 'stay'>) {
  const lines: string[] = []
  let calls = 0
  const supervisor = supervise({
    name: 'child',
    initialDelayMs: 20,
    maxDelayMs: 100,
    stableAfterMs: 2000,
    log: (line) => lines.push(line),
    start: async () => {
      const what = plan[Math.min(calls++, plan.length - 1)]
      if (what === 'crash') return node('process.exit(3)')
      // Lives past the "stable" mark, then dies.
      if (what === 'linger') return node('setTimeout(() => process.exit(4), 2500)')
      return node('setInterval(() => {}, 1000)')
    },
  })
  return { supervisor, lines, calls: () => calls }
}

const until = async (check: () => boolean) => {
  await expect.poll(check, { timeout: 10_000, interval: 10 }).toBe(true)
}

describe('the npm start supervisor', () => {
  it('restarts a dying child with doubling delays up to the cap, and once it has run long enough starts from the first delay again', async () => {
    const { supervisor, lines, calls } = scaled(['crash', 'crash', 'crash', 'crash', 'crash', 'linger', 'crash', 'stay'])
    await supervisor.first
    await until(() => calls() === 8 && supervisor.current() !== null)
    expect(lines).toEqual([
      'child stopped (exit code 3); starting it again in 20 ms',
      'child stopped (exit code 3); starting it again in 40 ms',
      'child stopped (exit code 3); starting it again in 80 ms',
      'child stopped (exit code 3); starting it again in 100 ms',
      'child stopped (exit code 3); starting it again in 100 ms',
      // The sixth run lasted past stableAfterMs: the back-off starts over.
      'child stopped (exit code 4); starting it again in 20 ms',
      'child stopped (exit code 3); starting it again in 40 ms',
    ])
    await supervisor.stop()
  })

  it('a child killed from outside is started again; stop() ends it and nothing restarts', async () => {
    const { supervisor, lines, calls } = scaled(['stay'])
    const first = await supervisor.first
    first.kill('SIGKILL')
    await until(() => calls() === 2 && supervisor.current() !== null)
    expect(lines).toEqual(['child stopped (signal SIGKILL); starting it again in 20 ms'])
    const second = supervisor.current()!
    await supervisor.stop()
    expect(second.signalCode).toBe('SIGTERM')
    expect(lines).toHaveLength(1)
    expect(supervisor.current()).toBeNull()
    expect(calls()).toBe(2)
  })

  it('a first start that fails is reported to the caller and not retried', async () => {
    const lines: string[] = []
    const supervisor = supervise({ name: 'child', log: (l) => lines.push(l), start: async () => { throw new Error('port 3000 is already in use') } })
    await expect(supervisor.first).rejects.toThrow('port 3000')
    await supervisor.stop()
    expect(lines).toEqual([])
  })
})
