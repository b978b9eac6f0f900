// Tables of the stockroom (reagent catalog, lots, usage, orders). Kept apart from schema.ts so
// the stockroom can grow without touching the rest; schema.ts's Database extends this.
import type { ColumnType, Generated, Selectable } from 'kysely'

type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type UpdatedAt = ColumnType<Date, Date | string | undefined, Date | string>
type TextArray = ColumnType<string[], string[] | undefined, string[]>

export type PhysicalState = 'solid' | 'liquid' | 'gas' | 'solution'
export type StockUnit = 'g' | 'mL'
export type OrderUnit = StockUnit | 'each'
export type OrderStatus = 'draft' | 'sent' | 'received'

export interface ReagentsTable {
  id: Generated<number>
  name: string
  smiles: string | null
  /** CAS Registry Number ("7732-18-5"), optional. */
  casNumber: Generated<string | null>
  formula: Generated<string>
  molarMass: number | null
  physicalState: PhysicalState
  density: number | null
  containerSize: number
  unit: StockUnit
  supplierName: Generated<string>
  supplierEmail: string | null
  catalogNumber: Generated<string>
  signalWord: 'Danger' | 'Warning' | null
  hazardCodes: TextArray
  hazards: TextArray
  storageNotes: Generated<string>
  shelfLifeMonths: number | null
  overagePercent: Generated<number>
  lowStockLevel: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface ReagentLotsTable {
  id: Generated<number>
  reagentId: number
  lotCode: Generated<string>
  quantity: number
  unit: StockUnit
  containers: Generated<number>
  location: Generated<string>
  /** DATE columns are 'YYYY-MM-DD' text (see connection.ts). */
  receivedOn: string
  openedOn: string | null
  expiresOn: string | null
  orderLineId: number | null
  createdBy: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

export interface ReagentUsageTable {
  id: Generated<number>
  lotId: number
  usedOn: string
  amount: number
  note: Generated<string>
  practicalId: number | null
  recordedBy: number | null
  createdAt: CreatedAt
}

export interface OrderSheetsTable {
  id: Generated<number>
  status: Generated<OrderStatus>
  title: string
  notes: Generated<string>
  forecastFrom: string | null
  forecastTo: string | null
  createdBy: number | null
  sentAt: Timestamp | null
  sentBy: number | null
  receivedOn: string | null
  receivedBy: number | null
  /** Never in a supplier's message. */
  internalNotes: Generated<string>
  /** Set when the coordinator closed the lines still open: why, when, who. */
  closedReason: string | null
  closedAt: Timestamp | null
  closedBy: number | null
  createdAt: CreatedAt
  updatedAt: UpdatedAt
}

/** One delivery of one line (part or all of it); a catalog line's receipt made a lot. */
export interface OrderReceiptsTable {
  id: Generated<number>
  orderLineId: number
  receivedOn: string
  containers: number
  lotId: number | null
  receivedBy: number | null
  createdAt: CreatedAt
}

export interface OrderLinesTable {
  id: Generated<number>
  orderId: number
  position: number
  reagentId: number | null
  name: string
  supplierName: Generated<string>
  supplierEmail: string | null
  catalogNumber: Generated<string>
  containers: number
  containerSize: number
  unit: OrderUnit
  note: Generated<string>
}

/** A proposed item-to-reagent link the coordinator dismissed. */
export interface ItemLinkDismissalsTable {
  practicalItemId: number
  reagentId: number
  dismissedBy: number | null
  dismissedAt: CreatedAt
}

export interface StockroomSettingsTable {
  id: Generated<number>
  rinseMlPerUnit: Generated<number>
  deliverTo: Generated<string>
  updatedAt: UpdatedAt
}

export interface StockroomTables {
  reagents: ReagentsTable
  reagentLots: ReagentLotsTable
  reagentUsage: ReagentUsageTable
  orderSheets: OrderSheetsTable
  orderLines: OrderLinesTable
  orderReceipts: OrderReceiptsTable
  itemLinkDismissals: ItemLinkDismissalsTable
  stockroomSettings: StockroomSettingsTable
}

export type Reagent = Selectable<ReagentsTable>
export type ReagentLot = Selectable<ReagentLotsTable>
export type ReagentUsage = Selectable<ReagentUsageTable>
export type OrderSheet = Selectable<OrderSheetsTable>
export type OrderLine = Selectable<OrderLinesTable>
export type OrderReceipt = Selectable<OrderReceiptsTable>
