import type { Substrate } from '../../database/schema'
import type { SessionUser } from '#shared/types/auth'
import type { StandardPeak, SubstrateDetail, SubstrateListItem } from '#shared/types/library'
import { useDb } from '../../utils/db'
import { asBadRequest } from '../../utils/errors'
import { substrateAnalysis, substrateDepiction } from './chemistry-cache'
import { libraryUsage } from './library-access'
import { substrateProductNamer } from './product-names'
import { substrateReferenceViews } from './reference-distributions'
import { libraryProducts, windowView } from './substrate-products'

// Substrates as the library pages show them.

export function toSubstrateListItem(row: Substrate, me: SessionUser, counts: { windowCount: number, usedBy: number }): SubstrateListItem {
  return {
    id: row.id,
    name: row.name,
    smiles: row.smiles,
    formula: row.formula,
    molarMass: row.molarMass,
    density: row.density,
    boilingPointC: row.boilingPointC,
    casNumber: row.casNumber,
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
      .select(['standardRuns.id', 'standardRuns.peaks', 'standardRuns.createdAt', 'files.originalName', 'files.sha256', 'files.byteSize',
        'users.name as uploadedBy'])
      .where('standardRuns.substrateId', '=', row.id).orderBy('standardRuns.createdAt', 'desc').orderBy('standardRuns.id', 'desc')
      .execute(),
    libraryUsage('substrates', [row.id]),
  ])
  const [nameOf, references] = await Promise.all([substrateProductNamer(db, row.id), substrateReferenceViews(row.id)])
  const [products,
    depictionSvg] = await Promise.all([libraryProducts(row.smiles, nameOf),
    substrateDepiction(row.smiles, { idPrefix: `substrate-${row.id}` })])
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
