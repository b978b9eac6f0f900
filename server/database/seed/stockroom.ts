import type { Insertable } from 'kysely'
import type { ReagentsTable } from '../schema-stockroom'
// Seed files run outside Nitro: engine code comes in by relative path.
import { canonicalSmiles, molarMassOf } from '../../../shared/utils/halogenation'
import { addDays, addMonths, weekStart } from '../../../shared/utils/dates'
import type { SeedContext } from './context'
import { DEMO_DOMAIN } from './people'

// The stockroom of the demo: a catalog for the two CHEM 2240 practicals, linked to their items,
// with stock that leaves a realistic shortfall for practical 2 next week (little
// 2,3-dimethylbutane, and a bottle of it that expires first; magnesium sulfate nearly gone).
// Suppliers and catalogue numbers are invented. GHS hazard statements are from memory and must
// be confirmed against the supplier's safety data sheet; densities: CRC Handbook, from memory; CAS Registry
// Numbers from memory (each passes its check digit).

const MERIDIAN = { supplierName: 'Meridian Laboratory Chemicals', supplierEmail: 'orders.meridian@supplier.example' }
const KESTREL = { supplierName: 'Kestrel Specialty Gases', supplierEmail: 'cylinders.kestrel@supplier.example' }
const NORTHFIELD = { supplierName: 'Northfield Scientific', supplierEmail: 'sales.northfield@supplier.example' }

type DemoReagent = Omit<Insertable<ReagentsTable>, 'formula' | 'molarMass'> & { key: string, formula?: string, molarMass?: number }

const CATALOG: DemoReagent[] = [
  {
    key: 'chlorobutane', name: '1-chlorobutane', smiles: 'CCCCCl', casNumber: '109-69-3',
    physicalState: 'liquid', density: 0.886, containerSize: 500, unit: 'mL',
    ...MERIDIAN, catalogNumber: 'MLC-1140', signalWord: 'Danger', hazardCodes: ['H225'], hazards: ['halogenated-waste'],
    storageNotes: 'Flammables cabinet, away from oxidisers.', shelfLifeMonths: 36, lowStockLevel: 250,
  },
  {
    key: 'dimethylbutane', name: '2,3-dimethylbutane', smiles: 'CC(C)C(C)C', casNumber: '79-29-8',
    physicalState: 'liquid', density: 0.662, containerSize: 25, unit: 'mL',
    ...MERIDIAN, catalogNumber: 'MLC-2233', signalWord: 'Danger', hazardCodes: ['H225', 'H304', 'H315', 'H336', 'H411'], hazards: [],
    storageNotes: 'Flammables cabinet; boils near 58 °C, keep the cap tight.', shelfLifeMonths: 24, lowStockLevel: 50,
  },
  {
    key: 'so2cl2', name: 'sulfuryl chloride', smiles: 'O=S(=O)(Cl)Cl', casNumber: '7791-25-5',
    physicalState: 'liquid', density: 1.67, containerSize: 100, unit: 'mL',
    ...MERIDIAN, catalogNumber: 'MLC-5010', signalWord: 'Danger', hazardCodes: ['H314', 'H331', 'H335'], hazards: ['sulfuryl-chloride'],
    storageNotes: 'Corrosives cabinet, dry, septum cap under nitrogen. Never near water or bases.', shelfLifeMonths: 12, lowStockLevel: 100,
  },
  {
    key: 'aibn', name: 'azobisisobutyronitrile (AIBN)', smiles: 'CC(C)(C#N)N=NC(C)(C)C#N', casNumber: '78-67-1',
    physicalState: 'solid', containerSize: 100, unit: 'g',
    ...MERIDIAN, catalogNumber: 'MLC-0911', signalWord: 'Danger', hazardCodes: ['H242', 'H302', 'H332', 'H412'], hazards: ['azo-initiator'],
    storageNotes: 'Refrigerator at 2–8 °C, away from heat and light. Keep only small bottles.', shelfLifeMonths: 24, lowStockLevel: 20,
  },
  {
    key: 'chlorine', name: 'chlorine', smiles: 'ClCl', casNumber: '7782-50-5',
    physicalState: 'gas', containerSize: 450, unit: 'g',
    ...KESTREL, catalogNumber: 'KSG-CL2-LB', signalWord: 'Danger',
    hazardCodes: ['H270', 'H280', 'H330', 'H315', 'H319', 'H335', 'H400'], hazards: ['chlorine'],
    storageNotes: 'Ventilated gas cabinet; cylinder chained upright, valve cap on when not in use; away from ammonia and flammables. Weigh the cylinder before and after each session.',
    shelfLifeMonths: null, overagePercent: 25, lowStockLevel: 150,
  },
  {
    key: 'dcm', name: 'dichloromethane', smiles: 'ClCCl', casNumber: '75-09-2',
    physicalState: 'liquid', density: 1.33, containerSize: 1000, unit: 'mL',
    ...NORTHFIELD, catalogNumber: 'NFS-DCM-1L', signalWord: 'Warning',
    hazardCodes: ['H315', 'H319', 'H336', 'H351'], hazards: ['halogenated-waste'],
    storageNotes: 'Solvent cabinet. GC sample diluent.', shelfLifeMonths: 36, lowStockLevel: 1000,
  },
  {
    // No SMILES for the salts: the formula and molar mass (IUPAC standard atomic weights) are typed.
    key: 'bicarbonate', name: 'sodium bicarbonate', formula: 'NaHCO3', molarMass: 84.007, casNumber: '144-55-8',
    physicalState: 'solid', containerSize: 500, unit: 'g',
    ...NORTHFIELD, catalogNumber: 'NFS-1025', signalWord: null, hazardCodes: [], hazards: [],
    storageNotes: 'Dry shelf. Made up as a 5 % w/v wash in the prep room.', shelfLifeMonths: 60, lowStockLevel: 250,
  },
  {
    key: 'mgso4', name: 'magnesium sulfate, anhydrous', formula: 'MgSO4', molarMass: 120.37, casNumber: '7487-88-9',
    physicalState: 'solid', containerSize: 500, unit: 'g',
    ...NORTHFIELD, catalogNumber: 'NFS-2050', signalWord: null, hazardCodes: [], hazards: [],
    storageNotes: 'Keep tightly closed: it takes up water from the air.', shelfLifeMonths: 60, lowStockLevel: 250,
  },
]

/** Which reagent each demo item draws on, by practical and item role. */
const LINKS: Record<'p1' | 'p2', Record<string, { key: string, percentWv?: number }>> = {
  p1: {
    'substrate': { key: 'chlorobutane' },
    'halogenating-agent': { key: 'so2cl2' },
    'initiator': { key: 'aibn' },
    'wash': { key: 'bicarbonate', percentWv: 5 },
    'drying-agent': { key: 'mgso4' },
  },
  p2: {
    'substrate': { key: 'dimethylbutane' },
    'halogenating-agent': { key: 'chlorine' },
    'wash': { key: 'bicarbonate', percentWv: 5 },
    'drying-agent': { key: 'mgso4' },
  },
}

interface DemoLot {
  key: string
  lotCode: string
  quantity: number
  containers?: number
  location: string
  received: number
  opened?: number
  /** Days from the Monday of the seeding week; omitted: the received date + the shelf life. */
  expires?: number | null
  /** [days from the Monday of the seeding week, amount, note, practical] */
  usage: Array<[number, number, string, ('p1' | 'p2')?]>
  order?: 'restock'
}

const CABINET = {
  flammables: 'Prep room 118, flammables cabinet F2',
  corrosives: 'Prep room 118, corrosives cabinet C1',
  cold: 'Prep room 118, refrigerator R1',
  gas: 'Bellweather Hall 214, gas cabinet G1',
  shelf: 'Prep room 118, shelf S4',
}
const P1 = -28

const LOTS: DemoLot[] = [
  { key: 'chlorobutane', lotCode: 'M24-7731', quantity: 500, location: CABINET.flammables, received: -70, opened: P1,
    usage: [
      [P1, 9.2, 'M1 practical 1', 'p1'], [P1 + 1, 9.0, 'T1 practical 1', 'p1'],
      [P1 + 2, 8.9, 'W1 practical 1', 'p1'], [P1 + 3, 9.3, 'R1 practical 1', 'p1'],
    ] },
  // Expired two weeks ago with 40 mL left: the overview asks for it to be disposed of.
  { key: 'so2cl2', lotCode: 'M23-5102', quantity: 100, location: CABINET.corrosives, received: -380, opened: -300, expires: -14,
    usage: [
      [-300, 26, 'Spring term practicals'], [P1, 8.5, 'M1 and T1 practical 1', 'p1'],
      [P1 + 2, 8.3, 'W1 and R1 practical 1', 'p1'], [-27, 17.2, 'Quenched: septum failed'],
    ] },
  { key: 'so2cl2', lotCode: 'M24-9018', quantity: 100, location: CABINET.corrosives, received: -35, usage: [], order: 'restock' },
  { key: 'aibn', lotCode: 'M22-0415', quantity: 100, location: CABINET.cold, received: -700, opened: -400, expires: 18,
    usage: [
      [-400, 1.5, 'Spring term practicals'], [P1, 0.35, 'M1 and T1 practical 1', 'p1'],
      [P1 + 2, 0.35, 'W1 and R1 practical 1', 'p1'],
    ] },
  // Little substrate for practical 2: one opened bottle, and one that expires before next week.
  { key: 'dimethylbutane', lotCode: 'M24-3310', quantity: 25, location: CABINET.flammables, received: -60, opened: -40,
    usage: [[-40, 6, 'GC standard run'], [-12, 7, 'TA trial of practical 2']] },
  { key: 'dimethylbutane', lotCode: 'M22-1187', quantity: 25, location: CABINET.flammables, received: -735, expires: 5, usage: [] },
  { key: 'chlorine', lotCode: 'K24-CL-0562', quantity: 450, location: CABINET.gas, received: -150, opened: -120,
    usage: [[-120, 196, 'Spring term practicals'], [-60, 121, 'Research group loan'], [-12, 13, 'TA trial of practical 2']] },
  { key: 'dcm', lotCode: 'N24-DCM-228', quantity: 2000, containers: 2, location: CABINET.flammables, received: -50, opened: -45,
    usage: [[-45, 380, 'GC sample dilution'], [P1, 220, 'GC sample dilution, practical 1', 'p1']] },
  { key: 'bicarbonate', lotCode: 'N23-1025-77', quantity: 500, location: CABINET.shelf, received: -300, opened: -300,
    usage: [[-300, 46, 'Spring term washes'], [P1 - 3, 34, 'Wash made up for practical 1', 'p1']] },
  { key: 'mgso4', lotCode: 'N23-2050-41', quantity: 500, location: CABINET.shelf, received: -300, opened: -300,
    usage: [[-300, 430, 'Spring term practicals'], [P1, 40, 'Practical 1', 'p1']] },
]

/** Canonical SMILES, formula and molar mass (to 3 decimals) of a catalog entry drawn as a structure. */
function structureIdentity(smiles: string) {
  const { formula, molarMass } = molarMassOf(smiles)
  return { smiles: canonicalSmiles(smiles), formula, molarMass: Number(molarMass.toFixed(3)) }
}

export async function seedStockroom(ctx: SeedContext): Promise<void> {
  const { db } = ctx
  const week0 = weekStart(ctx.today)
  const day = (offset: number) => addDays(week0, offset)
  const coordinatorId = ctx.users.get(`coordinator@${DEMO_DOMAIN}`) ?? null

  await db.updateTable('stockroomSettings').set({
    deliverTo: 'Chemistry stockroom, Bellweather Hall B12, Larkspur State University (receiving dock on Orchard Lane)',
    rinseMlPerUnit: 10,
  }).where('id', '=', 1).execute()

  const ids = new Map<string, {
    id: number
    shelfLifeMonths: number | null
    unit: 'g' | 'mL'
    containerSize: number
    name: string
    supplierName: string
    supplierEmail: string | null
    catalogNumber: string
  }>()
  for (const { key, formula, molarMass, ...r } of CATALOG) {
    const identity = r.smiles
      ? structureIdentity(r.smiles)
      : { smiles: null, formula: formula ?? '', molarMass: molarMass ?? null }
    const row = await db.insertInto('reagents').values({ ...r, ...identity }).returningAll().executeTakeFirstOrThrow()
    ids.set(key, row)
  }

  for (const practicalKey of ['p1', 'p2'] as const) {
    const practicalId = ctx.ids.practicals.get(practicalKey)
    if (!practicalId) throw new Error(`seedStockroom: practical ${practicalKey} is missing; seedPracticals must run first`)
    for (const [role, link] of Object.entries(LINKS[practicalKey])) {
      await db.updateTable('practicalItems').set({ reagentId: ids.get(link.key)!.id, solutionPercentWv: link.percentWv ?? null })
        .where('practicalId', '=', practicalId).where('role', '=', role as 'substrate').execute()
    }
  }

  // Five weeks ago: sulfuryl chloride for practical 1, requested and received. This week: solvent
  // and waste containers, requested and not yet here.
  const so2cl2 = ids.get('so2cl2')!
  const restock = await db.insertInto('orderSheets').values({
    title: 'Practical 1: sulfuryl chloride', status: 'received', forecastFrom: day(-38), forecastTo: day(-22), createdBy: coordinatorId,
    createdAt: new Date(`${day(-39)}T16:00:00Z`), updatedAt: new Date(`${day(-35)}T16:00:00Z`),
    sentAt: new Date(`${day(-38)}T15:00:00Z`), sentBy: coordinatorId, receivedOn: day(-35), receivedBy: coordinatorId,
    notes: 'Ship with the usual corrosive packaging.',
  }).returning('id').executeTakeFirstOrThrow()
  const restockLine = await db.insertInto('orderLines').values({
    orderId: restock.id, position: 0, reagentId: so2cl2.id, name: so2cl2.name,
    supplierName: so2cl2.supplierName, supplierEmail: so2cl2.supplierEmail, catalogNumber: so2cl2.catalogNumber,
    containers: 1, containerSize: so2cl2.containerSize, unit: so2cl2.unit, note: 'Short by 36 mL for practical 1',
  }).returning('id').executeTakeFirstOrThrow()
  const dcm = ids.get('dcm')!
  const solvent = await db.insertInto('orderSheets').values({
    title: 'GC solvent and waste containers', status: 'sent', createdBy: coordinatorId,
    sentAt: new Date(`${day(-1)}T15:00:00Z`), sentBy: coordinatorId,
    createdAt: new Date(`${day(-2)}T16:00:00Z`), updatedAt: new Date(`${day(-1)}T15:00:00Z`),
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('orderLines').values([
    {
      orderId: solvent.id, position: 0, reagentId: dcm.id, name: dcm.name,
      supplierName: dcm.supplierName, supplierEmail: dcm.supplierEmail, catalogNumber: dcm.catalogNumber,
      containers: 2, containerSize: 1000, unit: 'mL', note: '',
    },
    {
      orderId: solvent.id, position: 1, reagentId: null, name: 'Halogenated waste container, 4 L, vented cap',
      supplierName: NORTHFIELD.supplierName, supplierEmail: NORTHFIELD.supplierEmail, catalogNumber: 'NFS-WC-4L',
      containers: 4, containerSize: 1, unit: 'each', note: 'For the practical 2 pickups',
    },
  ]).execute()

  for (const lot of LOTS) {
    const reagent = ids.get(lot.key)!
    const receivedOn = day(lot.received)
    const shelfLifeEnd = reagent.shelfLifeMonths ? addMonths(receivedOn, reagent.shelfLifeMonths) : null
    const row = await db.insertInto('reagentLots').values({
      reagentId: reagent.id, lotCode: lot.lotCode, quantity: lot.quantity, unit: reagent.unit,
      containers: lot.containers ?? 1, location: lot.location,
      receivedOn, openedOn: lot.opened === undefined ? null : day(lot.opened),
      expiresOn: lot.expires === undefined ? shelfLifeEnd : lot.expires === null ? null : day(lot.expires),
      orderLineId: lot.order === 'restock' ? restockLine.id : null, createdBy: coordinatorId,
    }).returning('id').executeTakeFirstOrThrow()
    // The restock came in one delivery: its receipt names the lot it made, as a receipt through the page would.
    if (lot.order === 'restock') {
      await db.insertInto('orderReceipts').values({
        orderLineId: restockLine.id, receivedOn, containers: lot.containers ?? 1, lotId: row.id, receivedBy: coordinatorId,
      }).execute()
    }
    if (lot.usage.length) {
      await db.insertInto('reagentUsage').values(lot.usage.map(([offset, amount, note, practical]) => ({
        lotId: row.id, usedOn: day(offset), amount, note,
        practicalId: practical ? ctx.ids.practicals.get(practical)! : null, recordedBy: coordinatorId,
      }))).execute()
    }
  }
}
