import { afterEach, describe, expect, it } from 'vitest'
import { createEnginePool, EngineBusyError, EngineTimeoutError, type EnginePool, type EnginePoolOptions } from '../../server/engines/pool'
import { SubstrateError } from '../../shared/utils/halogenation'
import { RunInputError, practicalChemistryOf } from '../../shared/utils/submission'
import { UploadFormatError } from '../../shared/utils/lib/upload-content'

// The worker-thread pool the server runs its engines in, driven with the real worker module.
// "Slow" below is the explorer's heaviest valid request: a 40-carbon chain with a drawing of
// each of its 20 products (about a second here), against budgets of a tenth of that.
const worker = new URL('../support/engine-worker.mjs', import.meta.url)
let pools: EnginePool[] = []
afterEach(async () => {
  await Promise.all(pools.map((p) => p.close()))
  pools = []
})

function pool(options: Partial<EnginePoolOptions> = {}) {
  const created = createEnginePool({ filename: worker, threads: 1, maxQueue: 4, taskTimeoutMs: 30_000, queueTimeoutMs: 60_000, ...options })
  pools.push(created)
  return created
}

const slow = { smiles: 'C'.repeat(40), halogen: 'Cl' as const, productDepictions: true }
const chemistry = practicalChemistryOf('CCC', { halogen: 'Cl', rPrimary: 1, rSecondary: 3.8, rTertiary: 5 }, [
  { kind: 'product', productSmiles: 'CCCCl', rtMin: 1.0, rtMax: 1.5, responseFactor: 1 },
  { kind: 'product', productSmiles: 'CC(C)Cl', rtMin: 2.0, rtMax: 2.5, responseFactor: 1 },
])

describe('engine pool', () => {
  it('runs a task in a worker thread and returns plain data', async () => {
    const analysis = await pool().run('substrateAnalysis', { smiles: 'CCC', halogen: 'Cl' })
    // Propane has two kinds of C-H: six primary and two secondary hydrogens (common practice).
    expect(analysis.products.map((p) => [p.carbonClass, p.hydrogens])).toEqual([['primary', 6], ['secondary', 2]])
  }, 30_000)

  it('tells the time the task itself took in the worker, within the time the caller waited', async () => {
    const times: number[] = []
    const started = performance.now()
    await pool().run('substrateAnalysis', { smiles: 'CCCCCC', halogen: 'Cl' }, [], (ms) => times.push(ms))
    const waited = performance.now() - started
    expect(times).toHaveLength(1)
    expect(times[0]).toBeGreaterThan(0)
    expect(times[0]).toBeLessThanOrEqual(waited)
  }, 30_000)

  it('gives back engine errors as their own classes, with their fields', async () => {
    const engines = pool()
    const substrate = await engines.run('substrateAnalysis', { smiles: 'CCS', halogen: 'Cl' }).catch((e) => e)
    expect(substrate).toBeInstanceOf(SubstrateError)
    expect(substrate.code).toBe('unsupported-element')

    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d])
    const image = await engines.run('evaluateUpload', { bytes: png, chemistry }).catch((e) => e)
    expect(image).toBeInstanceOf(UploadFormatError)
    expect(image.status).toBe(415)

    const text = new TextEncoder().encode('Peak,RT (min),Area\n1,1.2,abc\n2,2.2,300\n')
    const table = await engines.run('evaluateUpload', { bytes: text, chemistry }, [text.buffer]).catch((e) => e)
    expect(table).toBeInstanceOf(RunInputError)
    expect(table.rows[0]).toMatchObject({ row: 2 })
    // The bytes were moved to the worker, not copied.
    expect(text.byteLength).toBe(0)
  }, 30_000)

  it('stops a task that runs over its budget, then serves the next one with a fresh worker', async () => {
    const engines = pool({ taskTimeoutMs: 100 })
    const late = await engines.run('analyzeRequest', slow).catch((e) => e)
    expect(late).toBeInstanceOf(EngineTimeoutError)
    expect(late.message).toMatch(/took longer than 0.1 s/)
    const next = await engines.run('substrateAnalysis', { smiles: 'CC', halogen: 'Cl' })
    expect(next.products).toHaveLength(1)
  }, 60_000)

  it('refuses a task at once when the queue is full', async () => {
    const engines = pool({ maxQueue: 1 })
    const running = engines.run('analyzeRequest', slow)
    const queued = engines.run('analyzeRequest', slow)
    await expect(engines.run('substrateAnalysis', { smiles: 'CC', halogen: 'Cl' })).rejects.toBeInstanceOf(EngineBusyError)
    expect((await running).products).toHaveLength(20)
    expect((await queued).products).toHaveLength(20)
  }, 60_000)

  it('gives up on a task that waits too long for a thread', async () => {
    const engines = pool({ queueTimeoutMs: 200 })
    // Time waiting for the worker to start counts too: let it start first.
    while (await engines.run('substrateAnalysis', { smiles: 'CC', halogen: 'Cl' }).then(() => false, (e) => e instanceof EngineBusyError));
    const running = engines.run('analyzeRequest', slow)
    const waiting = await engines.run('substrateAnalysis', { smiles: 'CC', halogen: 'Cl' }).catch((e) => e)
    expect(waiting).toBeInstanceOf(EngineBusyError)
    expect(waiting.retryAfterSeconds).toBeGreaterThan(0)
    expect((await running).products).toHaveLength(20)
  }, 60_000)
})
