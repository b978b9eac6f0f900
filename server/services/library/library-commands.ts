import type { Kysely } from 'kysely'
import type { z } from 'zod'
import type { Database, Method, Substrate } from '../../database/schema'
import { audit, type Actor } from '../../utils/audit'
import { storeFile, type UploadedFile } from '../../utils/files'
import { invalid } from '../../utils/validation'
import {
  substrateSourceIssue, type LibraryReagent, type methodInputSchema, type methodPatchSchema, type ReferenceInput, type StandardPeak,
  type substrateInputSchema, type substratePatchSchema,
} from '#shared/types/library'
import { copyName, refuseWhileInUse, type LibraryTable } from './library-access'
import { methodColumns, newMethodRow } from './methods'
import type { WindowRowValues } from './substrate-products'

// Writes to the library, each in one transaction with its audit row. The caller has loaded the
// entry with requireLibraryEntry ('edit' for a change: the instructor's own entry) and done the
// engine work first (canonical structure, products, resolved windows and names, the run's peaks),
// so these commands only check the rules and write.

type Db = Kysely<Database>
type Identity = { smiles: string, formula: string, molarMass: number }
const ENTITY = { substrates: 'substrate', methods: 'method' } as const

/**
 * Deletes an entry (409 while a practical uses it). A practical created after the usage check
 * still wins: its foreign key refuses the delete, which is reported as the same 409.
 */
export async function deleteLibraryEntry(db: Db, actor: Actor, table: LibraryTable, id: number, before: unknown) {
  await refuseWhileInUse(table, id, 'deleted', db)
  try {
    await db.transaction().execute(async (trx) => {
      await trx.deleteFrom(table as 'substrates').where('id', '=', id).execute()
      await audit(trx, actor, { action: `${ENTITY[table]}.delete`, entity: ENTITY[table], entityId: id, before })
    })
  } catch (error) {
    if ((error as { code?: string }).code === '23503') await refuseWhileInUse(table, id, 'deleted', db)
    throw error
  }
}

// ── Substrates ──────────────────────────────────────────────────────────────────────────────

export async function createSubstrate(db: Db, actor: Actor, ownerId: number, input: z.output<typeof substrateInputSchema>,
  identity: Identity) {
  return db.transaction().execute(async (trx) => {
    const created = await trx.insertInto('substrates').values({ ...input, ...identity, ownerId }).returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor,
      { action: 'substrate.create', entity: 'substrate', entityId: created.id, after: { ...input, ...identity } })
    return created
  })
}

/**
 * Changes a substrate. A new SMILES is analysed with `identify` (substrateIdentity: the engine's
 * canonical form). A new structure is refused while a practical uses the substrate, since
 * students' results were read against its products; otherwise it drops the product windows,
 * names and reference distributions of the old structure.
 */
export async function updateSubstrate(
  db: Db, actor: Actor, before: Substrate, patch: z.output<typeof substratePatchSchema>, identify: (smiles: string) => Promise<Identity>,
): Promise<Substrate> {
  const sourceIssue = substrateSourceIssue({ ...before, ...patch })
  if (sourceIssue) invalid([{ field: 'source', message: sourceIssue }])
  const id = before.id
  const identity = patch.smiles === undefined ? null : await identify(patch.smiles)
  const structureChanged = identity !== null && identity.smiles !== before.smiles
  if (structureChanged) await refuseWhileInUse('substrates', id, 'given another structure', db)

  return db.transaction().execute(async (trx) => {
    const updated = await trx.updateTable('substrates')
      .set({ ...patch, ...(identity ?? {}), updatedAt: new Date() })
      .where('id', '=', id).returningAll().executeTakeFirstOrThrow()
    const dropped = { droppedWindows: [] as unknown[], droppedNames: [] as unknown[], droppedReferences: [] as unknown[] }
    if (structureChanged) {
      dropped.droppedWindows = await trx.deleteFrom('substrateWindows').where('substrateId', '=', id).where('kind', '=', 'product')
        .returning(['productSmiles', 'rtMin', 'rtMax']).execute()
      dropped.droppedNames = await trx.deleteFrom('substrateProductNames').where('substrateId', '=', id)
        .returning(['productSmiles', 'name']).execute()
      dropped.droppedReferences = await trx.deleteFrom('substrateReferences').where('substrateId', '=', id)
        .returning(['reagent', 'percents', 'source']).execute()
    }
    await audit(trx, actor, {
      action: 'substrate.update', entity: 'substrate', entityId: id, before, after: { ...patch, ...(identity ?? {}), ...dropped },
    })
    return updated
  })
}

/** The caller's own copy of a substrate: windows, standard runs, product names and reference distributions included. */
export async function copySubstrate(db: Db, actor: Actor, ownerId: number, original: Substrate): Promise<Substrate> {
  const from = original.id
  return db.transaction().execute(async (trx) => {
    const { id: _id, createdAt: _c, updatedAt: _u, ...fields } = original
    const copy = await trx.insertInto('substrates').values({ ...fields, name: copyName(original.name), ownerId })
      .returningAll().executeTakeFirstOrThrow()
    const windows = await trx.selectFrom('substrateWindows').select(['kind', 'productSmiles', 'label', 'rtMin', 'rtMax', 'responseFactor'])
      .where('substrateId', '=', from).execute()
    if (windows.length) await trx.insertInto('substrateWindows').values(windows.map((w) => ({ ...w, substrateId: copy.id }))).execute()
    const runs = await trx.selectFrom('standardRuns').select(['fileId', 'peaks', 'createdBy', 'createdAt']).where('substrateId', '=', from)
      .execute()
    if (runs.length) {
      await trx.insertInto('standardRuns')
        .values(runs.map((r) => ({ ...r, peaks: JSON.stringify(r.peaks), substrateId: copy.id }))).execute()
    }
    const names = await trx.selectFrom('substrateProductNames').select(['productSmiles', 'name']).where('substrateId', '=', from).execute()
    if (names.length) {
      await trx.insertInto('substrateProductNames').values(names.map((n) => ({ ...n, substrateId: copy.id, updatedBy: ownerId }))).execute()
    }
    const references = await trx.selectFrom('substrateReferences').select(['reagent', 'percents', 'source', 'sourceKind'])
      .where('substrateId', '=', from).execute()
    if (references.length) {
      await trx.insertInto('substrateReferences')
        .values(references.map((r) => ({ ...r, percents: JSON.stringify(r.percents), substrateId: copy.id, updatedBy: ownerId }))).execute()
    }
    await audit(trx, actor, {
      action: 'substrate.copy', entity: 'substrate', entityId: copy.id,
      after: { copiedFrom: from, name: copy.name, windows: windows.length, standardRuns: runs.length, names: names.length,
        references: references.length },
    })
    return copy
  })
}

/**
 * Replaces every window of the substrate (resolved by resolveWindows) and, when given, the names
 * of its products (resolveProductNames). Returns the stored windows.
 */
export async function saveSubstrateWindows(
  db: Db, actor: Actor, substrateId: number, values: WindowRowValues[], names: Array<{ productSmiles: string, name: string }> | null,
) {
  return db.transaction().execute(async (trx) => {
    const before = await trx.deleteFrom('substrateWindows').where('substrateId', '=', substrateId)
      .returning(['kind', 'productSmiles', 'label', 'rtMin', 'rtMax', 'responseFactor']).execute()
    const rows = values.length
      ? await trx.insertInto('substrateWindows').values(values.map((v) => ({ ...v, substrateId }))).returningAll().execute()
      : []
    if (names) {
      const beforeNames = await trx.deleteFrom('substrateProductNames').where('substrateId', '=', substrateId)
        .returning(['productSmiles', 'name']).execute()
      if (names.length) {
        await trx.insertInto('substrateProductNames').values(names.map((n) => ({ ...n, substrateId, updatedBy: actor.id }))).execute()
      }
      await audit(trx, actor,
        { action: 'substrate.names', entity: 'substrate', entityId: substrateId, before: beforeNames, after: names })
    }
    await trx.updateTable('substrates').set({ updatedAt: new Date() }).where('id', '=', substrateId).execute()
    await audit(trx, actor, { action: 'substrate.windows', entity: 'substrate', entityId: substrateId, before, after: values })
    return rows
  })
}

/** Sets the reference distribution for one reagent family (percents from resolveReferencePercents). */
export async function setSubstrateReference(
  db: Db, actor: Actor, substrateId: number, reagent: LibraryReagent,
  percents: Array<{ smiles: string, percent: number }>, input: Pick<ReferenceInput, 'source' | 'sourceKind'>,
) {
  await db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom('substrateReferences').select(['percents', 'source', 'sourceKind'])
      .where('substrateId', '=', substrateId).where('reagent', '=', reagent).executeTakeFirst()
    const values = {
      percents: JSON.stringify(percents), source: input.source, sourceKind: input.sourceKind!, updatedBy: actor.id, updatedAt: new Date(),
    }
    await trx.insertInto('substrateReferences').values({ substrateId, reagent, ...values })
      .onConflict((oc) => oc.columns(['substrateId', 'reagent']).doUpdateSet(values)).execute()
    await trx.updateTable('substrates').set({ updatedAt: new Date() }).where('id', '=', substrateId).execute()
    await audit(trx, actor, {
      action: 'substrate.reference', entity: 'substrate', entityId: substrateId,
      before: before ?? null, after: { reagent, percents, source: input.source, sourceKind: input.sourceKind },
    })
  })
}

/** Removes a reference distribution; false when there was none. */
export async function deleteSubstrateReference(db: Db, actor: Actor, substrateId: number, reagent: LibraryReagent): Promise<boolean> {
  return db.transaction().execute(async (trx) => {
    const before = await trx.deleteFrom('substrateReferences').where('substrateId', '=', substrateId).where('reagent', '=', reagent)
      .returning(['percents', 'source', 'sourceKind']).executeTakeFirst()
    if (before) {
      await audit(trx, actor,
        { action: 'substrate.reference.delete', entity: 'substrate', entityId: substrateId, before: { reagent, ...before } })
    }
    return Boolean(before)
  })
}

/** Keeps a standard run's file and its peaks (read by the engine worker); returns the run's id. */
export async function addStandardRun(
  db: Db, actor: Actor, substrateId: number, file: UploadedFile, read: { peaks: StandardPeak[], mediaType: string },
): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const fileId = await storeFile(trx, file, actor.id!, read.mediaType)
    const run = await trx.insertInto('standardRuns')
      .values({ substrateId, fileId, peaks: JSON.stringify(read.peaks), createdBy: actor.id })
      .returning('id').executeTakeFirstOrThrow()
    await audit(trx, actor, {
      action: 'substrate.standard-run', entity: 'substrate', entityId: substrateId,
      after: { standardRunId: run.id, fileId, sha256: file.sha256, peaks: read.peaks.length },
    })
    return run.id
  })
}

// ── Methods ─────────────────────────────────────────────────────────────────────────────────

export async function createMethod(db: Db, actor: Actor, ownerId: number, input: z.output<typeof methodInputSchema>): Promise<Method> {
  return db.transaction().execute(async (trx) => {
    const created = await trx.insertInto('methods').values(newMethodRow(input, ownerId)).returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor, { action: 'method.create', entity: 'method', entityId: created.id, after: input })
    return created
  })
}

/** Changes a method; the halogen column follows the reagent (methodColumns). */
export async function updateMethod(db: Db, actor: Actor, before: Method, patch: z.output<typeof methodPatchSchema>): Promise<Method> {
  return db.transaction().execute(async (trx) => {
    const updated = await trx.updateTable('methods').set({ ...methodColumns(patch), updatedAt: new Date() })
      .where('id', '=', before.id).returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor, { action: 'method.update', entity: 'method', entityId: before.id, before, after: patch })
    return updated
  })
}

export async function copyMethod(db: Db, actor: Actor, ownerId: number, original: Method): Promise<Method> {
  return db.transaction().execute(async (trx) => {
    const { id: _id, createdAt: _c, updatedAt: _u, ...fields } = original
    const copy = await trx.insertInto('methods').values({ ...fields, name: copyName(original.name), ownerId })
      .returningAll().executeTakeFirstOrThrow()
    await audit(trx, actor,
      { action: 'method.copy', entity: 'method', entityId: copy.id, after: { copiedFrom: original.id, name: copy.name } })
    return copy
  })
}
