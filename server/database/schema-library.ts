// Product names and reference distributions of substrates. Kept apart from schema.ts;
// schema.ts's Database extends this.
import type { ColumnType, Generated, Selectable } from 'kysely'

type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type UpdatedAt = ColumnType<Date, Date | string | undefined, Date | string>

export interface SubstrateProductNamesTable {
  substrateId: number
  productSmiles: string
  name: string
  updatedBy: number | null
  updatedAt: UpdatedAt
}

export type ReferenceSourceKind = 'published' | 'from-memory' | 'course-results' | 'other'
export type ReferenceReagent = 'cl2-light' | 'so2cl2-azo' | 'br2-light' | 'nbs'

export interface SubstrateReferencesTable {
  id: Generated<number>
  substrateId: number
  reagent: ReferenceReagent
  percents: ColumnType<Array<{ smiles: string, percent: number }>, string, string>
  source: string
  sourceKind: ReferenceSourceKind
  updatedBy: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface LibraryDataTables {
  substrateProductNames: SubstrateProductNamesTable
  substrateReferences: SubstrateReferencesTable
}

export type SubstrateReference = Selectable<SubstrateReferencesTable>
