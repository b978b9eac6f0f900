import type { H3Event } from 'h3'
import type { Expression, ExpressionBuilder, SqlBool } from 'kysely'
import type { Database, Method, Substrate, SubstrateWindow, WindowKind } from '../database/schema'
import type { SessionUser } from '#shared/types/auth'
import type {
  LibraryProduct, MethodView, ProductNameInput, StandardPeak, SubstrateDetail, SubstrateListItem, SubstrateWindowView, WindowInput,
} from '#shared/types/library'
import { REAGENT_HALOGEN } from '#shared/types/library'
import { builtInProductName } from '#shared/data/product-names'
import { positionLetter } from '#shared/utils/depiction'
import { describeOverlap, findWindowOverlaps, windowDisplayName, type NamedTimeWindow } from '#shared/utils/windows'
import { messageExcerpt } from '#shared/utils/text-input'

// The substrate library and the halogenation methods. Who sees what:
//   shared entries (owner null)  every staff member reads them; nobody edits them (copy instead)
//   an instructor's own entries  they read, edit and delete them
//   entries used by a practical  readable by whoever may see that practical's course (a co-owner,
//                                the course's TAs, the coordinator for the stockroom)
// Students never list the library: their practical's page carries its substrate and windows.

export type LibraryTable = 'substrates' | 'methods'
export type LibraryMode = 'read' | 'edit'

const USED_BY_COLUMN = { substrates: 'substrateId', methods: 'methodId' } as const
const NOUN = { substrates: 'Substrate', methods: 'Method' } as const

export function requireLibraryReader(event: H3Event) {
  return requireRole(event, 'instructor', 'ta', 'coordinator')
}

/** The scope of a library query, for its where clause: shared, mine, or used in a course I see. */
type ScopeOf<T extends LibraryTable> = (eb: ExpressionBuilder<Database, T>) => Expression<SqlBool>
export function libraryScope(me: SessionUser, courseIds: number[], table: 'substrates'): ScopeOf<'substrates'>
export function libraryScope(me: SessionUser, courseIds: number[], table: 'methods'): ScopeOf<'methods'>
export function libraryScope(me: SessionUser, courseIds: number[], table: LibraryTable): ScopeOf<LibraryTable> {
  // Both tables have id and owner_id, so a builder over either names them.
  return (eb: ExpressionBuilder<Database, LibraryTable>) => eb.or([
    eb('ownerId', 'is', null),
    eb('ownerId', '=', me.id),
    ...(courseIds.length
      ? [eb('id', 'in', eb.selectFrom('practicals').select(`practicals.${USED_BY_COLUMN[table]}`)
        .where('practicals.courseId', 'in', courseIds))]
      : []),
  ])
}

/** One entry of either table, within the caller's scope. */
function libraryRow(me: SessionUser, courseIds: number[], table: LibraryTable, id: number): Promise<Substrate | Method | undefined> {
  const db = useDb()
  return table === 'substrates'
    ? db.selectFrom('substrates').selectAll().where('id', '=', id).where(libraryScope(me, courseIds, table)).executeTakeFirst()
    : db.selectFrom('methods').selectAll().where('id', '=', id).where(libraryScope(me, courseIds, table)).executeTakeFirst()
}

/**
 * Loads one library entry the caller may see (404 otherwise). 'edit' also needs the caller to
 * be the instructor who created it: shared entries are read-only for everyone (403).
 */
type EntryOf<R> = Promise<{ me: SessionUser, row: R }>
export function requireLibraryEntry(event: H3Event, table: 'substrates', id: number, mode: LibraryMode): EntryOf<Substrate>
export function requireLibraryEntry(event: H3Event, table: 'methods', id: number, mode: LibraryMode): EntryOf<Method>
export async function requireLibraryEntry(
  event: H3Event, table: LibraryTable, id: number, mode: LibraryMode,
): EntryOf<Substrate | Method> {
  const me = requireLibraryReader(event)
  if (mode === 'edit' && me.role !== 'instructor') throw createError({ statusCode: 403, statusMessage: 'Only instructors can change the library' })
  const courseIds = await visibleCourseIds(me)
  const row = await libraryRow(me, courseIds, table, id)
  if (!row) throw createError({ statusCode: 404, statusMessage: `${NOUN[table]} not found` })
  if (mode === 'edit' && row.ownerId === null) {
    throw createError({ statusCode: 403, statusMessage: 'Shared library entries are read-only; make a copy to change it' })
  }
  if (mode === 'edit' && row.ownerId !== me.id) {
    throw createError({ statusCode: 403, statusMessage: 'Only the instructor who created this entry can change it' })
  }
  return { me, row }
}

/** Practicals using each entry, by id. */
export async function libraryUsage(table: LibraryTable, ids: number[]): Promise<Map<number, number>> {
  if (!ids.length) return new Map()
  const column = `practicals.${USED_BY_COLUMN[table]}` as 'practicals.substrateId'
  const rows = await useDb().selectFrom('practicals').select((eb) => [eb.ref(column).as('entryId'), eb.fn.countAll<number>().as('n')])
    .where(column, 'in', ids).groupBy(column).execute()
  return new Map(rows.map((r) => [r.entryId, r.n]))
}

/** 409 while a practical uses the entry: its students' results depend on it. */
export async function refuseWhileInUse(table: LibraryTable, id: number, doing: string) {
  const used = (await libraryUsage(table, [id])).get(id) ?? 0
  if (used > 0) {
    throw createError({ statusCode: 409, statusMessage: `${NOUN[table]} is used by ${used} practical${used === 1 ? '' : 's'}; it cannot be ${doing}` })
  }
}

/** "2,3-dimethylbutane (copy)", kept within the name's length limit. */
export function copyName(name: string): string {
  const suffix = ' (copy)'
  return `${name.slice(0, 120 - suffix.length)}${suffix}`
}

// ── Substrates ──────────────────────────────────────────────────────────────────────────────

/** Chlorination products, lettered as the depiction letters them, each with its bromo twin and their names. */
export async function libraryProducts(smiles: string, nameOf: (smiles: string) => string | null = builtInProductName): Promise<LibraryProduct[]> {
  const [cl, br] = await Promise.all([substrateAnalysis(smiles, 'Cl'), substrateAnalysis(smiles, 'Br')])
  return cl.products.map((p, i) => {
    const brominated = (br.products.find((q) => q.atoms[0] === p.atoms[0]) ?? br.products[i]!).smiles
    return {
      label: positionLetter(i),
      smiles: p.smiles,
      brominated,
      name: nameOf(p.smiles),
      brominatedName: nameOf(brominated),
      hydrogens: p.hydrogens,
      carbonClass: p.carbonClass,
    }
  })
}

/**
 * A client's SMILES for products in canonical form (read in one engine task), or a 400 naming
 * the field of the first that cannot be read.
 */
export async function canonicalOrInvalid(items: Array<{ smiles: string, field: string }>): Promise<string[]> {
  const forms = await canonicalForms(items.map((i) => i.smiles))
  return items.map((item, i) => forms[i] ?? invalid([{ field: item.field, message: `“${messageExcerpt(item.smiles, 60)}” is not a readable SMILES` }]))
}

/** The same products with names from another source (after the instructor renamed some). */
export function renameLibraryProducts(products: LibraryProduct[], nameOf: (smiles: string) => string | null): LibraryProduct[] {
  return products.map((p) => ({ ...p, name: nameOf(p.smiles), brominatedName: nameOf(p.brominated) }))
}

/**
 * The names to store for a substrate's products: each SMILES matched to one of its products
 * (any spelling), no product twice; a name equal to the built-in one, or empty, stores nothing.
 */
export async function resolveProductNames(names: ProductNameInput[], products: LibraryProduct[], substrateName: string): Promise<Array<{ productSmiles: string, name: string }>> {
  const index = productIndex(products)
  const seen = new Set<string>()
  const rows: Array<{ productSmiles: string, name: string }> = []
  const forms = await canonicalOrInvalid(names.map((n, i) => ({ smiles: n.productSmiles, field: `names.${i}.productSmiles` })))
  names.forEach((n, i) => {
    const field = `names.${i}.productSmiles`
    const canonical = forms[i]!
    if (!index.has(canonical)) invalid([{ field, message: `“${messageExcerpt(n.productSmiles, 60)}” is not a monohalogenation product of ${substrateName}` }])
    if (seen.has(canonical)) invalid([{ field, message: `${canonical} is named twice` }])
    seen.add(canonical)
    const name = n.name.trim()
    if (name && name !== builtInProductName(canonical)) rows.push({ productSmiles: canonical, name })
  })
  return rows
}

interface ProductRef { position: string, halogen: 'Cl' | 'Br', smiles: string }

function productIndex(products: LibraryProduct[]): Map<string, ProductRef> {
  const index = new Map<string, ProductRef>()
  for (const p of products) {
    index.set(p.smiles, { position: p.label, halogen: 'Cl', smiles: p.smiles })
    index.set(p.brominated, { position: p.label, halogen: 'Br', smiles: p.brominated })
  }
  return index
}

export function windowView(w: SubstrateWindow, products: LibraryProduct[]): SubstrateWindowView {
  const ref = w.productSmiles ? productIndex(products).get(w.productSmiles) : undefined
  return {
    id: w.id,
    kind: w.kind,
    productSmiles: w.productSmiles,
    position: ref?.position ?? null,
    halogen: ref?.halogen ?? null,
    label: w.label,
    rtMin: w.rtMin,
    rtMax: w.rtMax,
    responseFactor: w.responseFactor,
  }
}

export interface WindowRowValues {
  kind: WindowKind
  productSmiles: string | null
  label: string
  rtMin: number
  rtMax: number
  responseFactor: number
}

/**
 * Matches each product window to the substrate's products (any SMILES spelling), then refuses
 * duplicates and overlapping windows, naming the rows. Returns the rows to store.
 */
export async function resolveWindows(windows: Array<WindowInput & { responseFactor: number }>, products: LibraryProduct[], substrateName: string): Promise<WindowRowValues[]> {
  const index = productIndex(products)
  const seen = new Map<string, number>()
  const named = windows.flatMap((w, i) => (w.kind === 'product' ? [{ smiles: w.productSmiles!, field: `windows.${i}.productSmiles`, i }] : []))
  const forms = new Map((await canonicalOrInvalid(named)).map((form, k) => [named[k]!.i, form]))
  const rows = windows.map((w, i): WindowRowValues & NamedTimeWindow => {
    const field = `windows.${i}.productSmiles`
    let ref: ProductRef | undefined
    if (w.kind === 'product') {
      const canonical = forms.get(i)!
      ref = index.get(canonical)
      if (!ref) invalid([{ field, message: `“${messageExcerpt(w.productSmiles ?? '', 60)}” is not a monohalogenation product of ${substrateName}` }])
      if (seen.has(ref.smiles)) invalid([{ field, message: `${ref.position} (${ref.smiles}) already has a window in row ${seen.get(ref.smiles)! + 1}` }])
      seen.set(ref.smiles, i)
    }
    const label = w.kind === 'product' ? ref!.position : (w.label?.trim() || (w.kind === 'solvent' ? 'solvent' : 'starting material'))
    return {
      kind: w.kind,
      productSmiles: ref?.smiles ?? null,
      label,
      rtMin: w.rtMin,
      rtMax: w.rtMax,
      responseFactor: w.responseFactor,
      name: windowDisplayName({ kind: w.kind, position: ref?.position, halogen: ref?.halogen, productSmiles: ref?.smiles, label }),
      group: ref?.halogen ?? null,
    }
  })
  const [overlap] = findWindowOverlaps(rows)
  if (overlap) {
    const message = describeOverlap(overlap)
    invalid(overlap.map((w) => ({ field: `windows.${rows.indexOf(w)}`, message })))
  }
  return rows.map(({ name: _name, group: _group, ...values }) => values)
}

export function toSubstrateListItem(row: Substrate, me: SessionUser, counts: { windowCount: number, usedBy: number }): SubstrateListItem {
  return {
    id: row.id,
    name: row.name,
    smiles: row.smiles,
    formula: row.formula,
    molarMass: row.molarMass,
    density: row.density,
    boilingPointC: row.boilingPointC,
    shared: row.ownerId === null,
    mine: row.ownerId === me.id,
    ...counts,
  }
}

export async function substrateDetail(row: Substrate, me: SessionUser): Promise<SubstrateDetail> {
  const db = useDb()
  const [windows, runs, usage] = await Promise.all([
    db.selectFrom('substrateWindows').selectAll().where('substrateId', '=', row.id).orderBy('rtMin').orderBy('id').execute(),
    db.selectFrom('standardRuns')
      .innerJoin('files', 'files.id', 'standardRuns.fileId')
      .leftJoin('users', 'users.id', 'standardRuns.createdBy')
      .select(['standardRuns.id', 'standardRuns.peaks', 'standardRuns.createdAt', 'files.originalName', 'files.sha256', 'files.byteSize', 'users.name as uploadedBy'])
      .where('standardRuns.substrateId', '=', row.id).orderBy('standardRuns.createdAt', 'desc').orderBy('standardRuns.id', 'desc').execute(),
    libraryUsage('substrates', [row.id]),
  ])
  const [nameOf, references] = await Promise.all([substrateProductNamer(db, row.id), substrateReferenceViews(row.id)])
  const [products, depictionSvg] = await Promise.all([libraryProducts(row.smiles, nameOf), substrateDepiction(row.smiles, { idPrefix: `substrate-${row.id}` })])
  return {
    ...toSubstrateListItem(row, me, { windowCount: windows.length, usedBy: usage.get(row.id) ?? 0 }),
    notes: row.notes,
    source: row.source,
    products,
    references,
    windows: windows.map((w) => windowView(w, products)),
    depictionSvg,
    standardRuns: runs.map((r) => ({
      id: r.id,
      fileName: r.originalName,
      sha256: r.sha256,
      byteSize: r.byteSize,
      uploadedBy: r.uploadedBy,
      createdAt: r.createdAt.toISOString(),
      peaks: r.peaks as StandardPeak[],
    })),
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

/** Canonical SMILES, formula and molar mass of a substrate, always computed here (a 400 when it cannot be analysed). */
export async function substrateIdentity(smiles: string) {
  const analysis = await asBadRequest(() => substrateAnalysis(smiles))
  return { smiles: analysis.canonicalSmiles, formula: analysis.formula, molarMass: analysis.molarMass }
}

// ── Methods ─────────────────────────────────────────────────────────────────────────────────

export function toMethodView(row: Method, me: SessionUser, usedBy: number): MethodView {
  return {
    id: row.id,
    name: row.name,
    reagent: row.reagent,
    halogen: row.halogen,
    temperatureC: row.temperatureC,
    reactivity: { primary: row.rPrimary, secondary: row.rSecondary, tertiary: row.rTertiary },
    source: row.source,
    notes: row.notes,
    shared: row.ownerId === null,
    mine: row.ownerId === me.id,
    usedBy,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

/**
 * Deletes an entry in one transaction with its audit row. A practical created after the usage
 * check still wins: its foreign key refuses the delete, which is reported as the same 409.
 */
export async function deleteLibraryEntry(event: H3Event, table: LibraryTable, id: number, before: unknown) {
  await refuseWhileInUse(table, id, 'deleted')
  try {
    await useDb().transaction().execute(async (trx) => {
      await trx.deleteFrom(table as 'substrates').where('id', '=', id).execute()
      await audit(trx, event, { action: `${table === 'substrates' ? 'substrate' : 'method'}.delete`, entity: table === 'substrates' ? 'substrate' : 'method', entityId: id, before })
    })
  } catch (error) {
    if ((error as { code?: string }).code === '23503') await refuseWhileInUse(table, id, 'deleted')
    throw error
  }
}

interface MethodFields {
  name?: string
  halogen?: 'Cl' | 'Br'
  reagent?: Method['reagent']
  temperatureC?: number
  reactivity?: { primary: number, secondary: number, tertiary: number }
  source?: string
  notes?: string
}

/** Form fields to columns (for a PATCH, only those given); the halogen follows from the reagent. */
export function methodColumns(input: MethodFields) {
  // A halogen sent with the form was checked against the reagent; the column follows the reagent.
  const { reactivity, reagent, halogen: _halogen, ...rest } = input
  return {
    ...rest,
    ...(reagent ? { reagent, halogen: REAGENT_HALOGEN[reagent] } : {}),
    ...(reactivity ? { rPrimary: reactivity.primary, rSecondary: reactivity.secondary, rTertiary: reactivity.tertiary } : {}),
  }
}

/** A complete method row from a validated form. */
export function newMethodRow(input: Required<Omit<MethodFields, 'halogen'>>, ownerId: number | null) {
  return {
    name: input.name,
    reagent: input.reagent,
    halogen: REAGENT_HALOGEN[input.reagent],
    temperatureC: input.temperatureC,
    rPrimary: input.reactivity.primary,
    rSecondary: input.reactivity.secondary,
    rTertiary: input.reactivity.tertiary,
    source: input.source,
    notes: input.notes,
    ownerId,
  }
}
