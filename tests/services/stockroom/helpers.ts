import { randomUUID } from 'node:crypto'
import { vi } from 'vitest'
import type { z } from 'zod'
import { reagentInputSchema } from '../../../shared/types/stockroom'
import type { Actor } from '../../../server/utils/audit'
import { createUser, testDb } from '../../support/db'

// Some cross-cutting helpers the stockroom service calls (course scope, sections) still read the
// database through Nitro's auto-imported useDb(); here it is the test database.
vi.stubGlobal('useDb', testDb)

/** A coordinator acting from a documentation address (RFC 5737 TEST-NET-1). */
export async function coordinator(): Promise<Actor> {
  const user = await createUser('coordinator')
  return { id: user.id, name: 'Test coordinator', role: 'coordinator', ip: '192.0.2.7' }
}

/** A reagent input with a unique name, as the route's schema leaves it after parsing. */
export function reagentInput(overrides: Partial<z.input<typeof reagentInputSchema>> = {}) {
  return reagentInputSchema.parse({
    name: `Test reagent ${randomUUID().slice(0, 8)}`, physicalState: 'liquid', containerSize: 500, unit: 'mL',
    density: 1.5, overagePercent: 10, formula: '', molarMass: null, ...overrides,
  })
}

/** The audit rows written for one entity, oldest first. */
export function auditRows(entity: string, entityId: number) {
  return testDb().selectFrom('auditLog').selectAll().where('entity', '=', entity).where('entityId', '=', String(entityId))
    .orderBy('id').execute()
}

/** An h3 error's status and message, from a promise that must be refused. */
export async function refusal(work: Promise<unknown>): Promise<{ statusCode: number, statusMessage: string }> {
  const error = await work.then(() => null, (e: unknown) => e as { statusCode: number, statusMessage: string })
  if (!error) throw new Error('expected the command to refuse')
  return { statusCode: error.statusCode, statusMessage: error.statusMessage }
}
