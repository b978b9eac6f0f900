// Tables of the stockroom (reagent catalog, lots, usage, orders). Kept apart from schema.ts so
// the stockroom can grow without touching the rest; schema.ts's Database extends this.
export interface StockroomTables {}
