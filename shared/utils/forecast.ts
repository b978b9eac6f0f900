// The stockroom's usage forecast. Pure: plain data in, plain data out; no database, no Nuxt and
// no clock (today comes in as a date). Imported by relative path, like the other engines.
//
//   required  = Σ over meetings in the range: work units × per-unit amount (converted to the
//               reagent's stock unit) × (1 + overage)
//   a prepared solution (N % w/v of a stocked solid, made up with water) counts as its solid:
//               g per unit = mL of solution × N / 100 (w/v: g of solute per 100 mL of solution);
//               the water is not stock and is only named on the line
//   onHand    = stock that will still be in date when it is used (first-expiring lots first)
//   shortfall = required − onHand (never below zero), ordered in whole containers
import { addDays, isoWeekLabel, weekStart } from './dates'
import { computeQuantities, isGas, type ItemSpec } from './procedure'
import type { QuantityView } from '../types/practical'
import type { ForecastLine, ForecastSession, ForecastSolution, ForecastWeek, SkippedSession, StockUnitName } from '../types/stockroom'
import type { HazardKey } from '../data/cautions'

/** Float noise (0.1 + 0.2) must not buy a whole extra container. */
const EPSILON = 1e-9

export interface ForecastReagent {
  id: number
  name: string
  unit: StockUnitName
  containerSize: number
  overagePercent: number
  molarMass: number | null
  density: number | null
  physicalState: 'solid' | 'liquid' | 'gas' | 'solution'
  supplierName: string
  hazards: HazardKey[]
}

export interface ForecastItem extends ItemSpec {
  id: number
  reagentId: number | null
  /** % w/v (g per 100 mL) when the item is a solution made up with water from the reagent, a solid. */
  solutionPercentWv: number | null
  /** CAS Registry Number, when the item carries one (used to propose a link). */
  casNumber?: string | null
}

export interface ForecastPractical {
  id: number
  title: string
  courseId: number
  courseCode: string
  workUnit: 'pair' | 'student'
  items: ForecastItem[]
}

export interface ForecastSessionInput {
  practicalId: number
  sectionId: number
  sectionCode: string
  meetingDate: string
  /** False when the section no longer meets that day (a skipped date, a shortened term). */
  isMeeting: boolean
  students: number
  units: number
}

export interface ForecastLot {
  id: number
  reagentId: number
  /** What is left, in `unit`. */
  remaining: number
  unit: StockUnitName
  expiresOn: string | null
}

export interface ForecastInput {
  /** The day the forecast is made; meetings from here to `from` draw on stock first. */
  today: string
  from: string
  to: string
  reagents: ForecastReagent[]
  practicals: ForecastPractical[]
  sessions: ForecastSessionInput[]
  lots: ForecastLot[]
  rinseMlPerUnit: number
}

export interface ForecastResult {
  lines: ForecastLine[]
  halogenatedWasteMl: number
  weeks: ForecastWeek[]
  sessions: ForecastSession[]
  skippedSessions: SkippedSession[]
  /** Linked items whose amount could not be put in the reagent's unit, one sentence each. */
  problems: string[]
}

// ── Work units and per-unit amounts ───────────────────────────────────────────────────

/**
 * Work units at one meeting. Per student: every active student. Per pair (one hood station):
 * every occupied station counts once, however many sit at it, and students not yet placed
 * fill stations of `studentsPerStation` (2 for pairs), rounded up.
 */
export function workUnitsOf(students: Array<{ station: number | null }>, workUnit: 'pair' | 'student', studentsPerStation: number): number {
  if (workUnit === 'student') return students.length
  const stations = new Set(students.filter((s) => s.station !== null).map((s) => s.station))
  const unplaced = students.filter((s) => s.station === null).length
  return stations.size + Math.ceil(unplaced / Math.max(1, studentsPerStation))
}

/**
 * One work unit's amount of an item in the reagent's stock unit, or a sentence saying why not.
 * The item's own molar mass and density come first; the catalog's fill the gaps.
 */
export function perUnitAmount(
  quantity: QuantityView, item: ForecastItem, reagent: ForecastReagent,
): { amount: number } | { problem: string } {
  const cannot = (why: string) => ({ problem: `${item.name} (${reagent.name}): ${why}` })
  if (item.solutionPercentWv !== null) {
    if (quantity.millilitres === null) return cannot('a solution in % w/v needs the item in mL.')
    if (reagent.unit !== 'g') return cannot('a solution in % w/v is made up from a solid counted in g.')
    return { amount: solidGramsOf(quantity.millilitres, item.solutionPercentWv) }
  }
  if (reagent.unit === 'g') {
    if (quantity.grams !== null) return { amount: quantity.grams }
    if (quantity.millilitres !== null && reagent.density) return { amount: quantity.millilitres * reagent.density }
    return cannot('no mass could be worked out (give a density or a molar mass).')
  }
  if (quantity.gas) return cannot('a gas is stocked by mass; set the reagent’s unit to g.')
  if (quantity.millilitres !== null) return { amount: quantity.millilitres }
  if (quantity.grams !== null && reagent.density) return { amount: quantity.grams / reagent.density }
  return cannot('no volume could be worked out (the reagent needs a density).')
}

/** Grams of solid in `millilitres` of an N % w/v solution: w/v is g of solute per 100 mL of solution. */
export function solidGramsOf(millilitres: number, percentWv: number): number {
  return millilitres * percentWv / 100
}

/** Items as computeQuantities sees them, with the catalog's molar mass and density filling gaps. */
function withCatalogData(item: ForecastItem, reagent: ForecastReagent | undefined): ItemSpec {
  const spec: ItemSpec = {
    role: item.role, name: item.name, smiles: item.smiles, molarMass: item.molarMass, density: item.density, basis: item.basis,
    amount: item.amount,
  }
  // A solution's density is not the solid's: only the item itself is taken as the reagent.
  if (!reagent || item.solutionPercentWv !== null) return spec
  return { ...spec, molarMass: spec.molarMass ?? reagent.molarMass, density: spec.density ?? (isGas(item.smiles) ? null : reagent.density) }
}

const WASTE_ROLES = new Set(['substrate', 'halogenating-agent', 'solvent'])

/**
 * Halogenated waste of one work unit (a planning estimate): the organic liquids of the
 * procedure, which leave the flask as a halogenated mixture, plus the rinse allowance.
 */
export function wastePerUnit(quantities: QuantityView[], rinseMlPerUnit: number): number {
  const liquids = quantities.filter((q) => WASTE_ROLES.has(q.role) && !q.gas && q.millilitres !== null)
  return liquids.reduce((sum, q) => sum + q.millilitres!, 0) + rinseMlPerUnit
}

// ── Stock against demand ──────────────────────────────────────────────────────────────

interface Demand { date: string, amount: number }

/**
 * First-expiring first: each demand, in date order, draws from the in-date lot that expires
 * soonest. This covers as much as any order of drawing can. Returns what each lot gave.
 */
export function allocateStock(
  demands: Demand[], lots: Array<{ id: number, remaining: number, expiresOn: string | null }>,
): { covered: number[], drawn: Map<number, number> } {
  const left = lots.map((l) => ({ ...l, left: l.remaining }))
    .sort((a, b) => (a.expiresOn ?? '9999-12-31').localeCompare(b.expiresOn ?? '9999-12-31') || a.id - b.id)
  const drawn = new Map<number, number>()
  const covered = new Array<number>(demands.length).fill(0)
  const byDate = demands.map((_, i) => i).sort((a, b) => demands[a]!.date.localeCompare(demands[b]!.date) || a - b)
  for (const i of byDate) {
    const demand = demands[i]!
    let need = demand.amount
    for (const lot of left) {
      if (need <= EPSILON) break
      if (lot.left <= EPSILON || (lot.expiresOn !== null && lot.expiresOn < demand.date)) continue
      const take = Math.min(need, lot.left)
      lot.left -= take
      need -= take
      drawn.set(lot.id, (drawn.get(lot.id) ?? 0) + take)
    }
    covered[i] = demand.amount - Math.max(0, need)
  }
  return { covered, drawn }
}

const round = (value: number, places = 3) => Math.round(value * 10 ** places) / 10 ** places
const sum = (values: number[]) => values.reduce((a, b) => a + b, 0)

function convertLot(lot: ForecastLot, reagent: ForecastReagent): number | null {
  if (lot.unit === reagent.unit) return lot.remaining
  if (!reagent.density) return null
  return lot.unit === 'g' ? lot.remaining / reagent.density : lot.remaining * reagent.density
}

/** A prepared solution behind a per-unit amount: its name, strength and mL per unit. */
interface SolutionUse { name: string, percentWv: number, ml: number }
interface PerUnitNeeds { amounts: Array<{ reagentId: number, amount: number, solution: SolutionUse | null }>, wasteMl: number }

/** Per practical: each linked item's amount per work unit, and the waste per unit. */
function perUnitNeeds(input: ForecastInput, reagents: Map<number, ForecastReagent>, problems: Set<string>): Map<number, PerUnitNeeds> {
  const perUnit = new Map<number, PerUnitNeeds>()
  for (const p of input.practicals) {
    const reagentOf = (item: ForecastItem) => (item.reagentId === null ? undefined : reagents.get(item.reagentId))
    const quantities = computeQuantities(p.items.map((item) => withCatalogData(item, reagentOf(item))))
    const amounts: PerUnitNeeds['amounts'] = []
    p.items.forEach((item, i) => {
      const reagent = reagentOf(item)
      if (!reagent) return
      const result = perUnitAmount(quantities.items[i]!, item, reagent)
      if ('problem' in result) {
        problems.add(`${p.title}: ${result.problem}`)
        return
      }
      const ml = quantities.items[i]!.millilitres
      const solution = item.solutionPercentWv !== null && ml !== null ? { name: item.name, percentWv: item.solutionPercentWv, ml } : null
      amounts.push({ reagentId: reagent.id, amount: result.amount, solution })
    })
    perUnit.set(p.id, { amounts, wasteMl: wastePerUnit(quantities.items, input.rinseMlPerUnit) })
  }
  return perUnit
}

type RangedDemand = Demand & { inRange: boolean, solution: SolutionUse | null }

interface ScheduledDemand {
  sessions: ForecastSession[]
  skippedSessions: SkippedSession[]
  /** Per reagent, every meeting's amount up to the range's end; earlier ones draw on stock first. */
  demands: Map<number, RangedDemand[]>
}

/** Why a meeting draws nothing, or null when it counts. */
function skipReason(s: ForecastSessionInput, today: string): string | null {
  // Meetings already held drew on stock then (their usage is recorded against the lots).
  if (s.meetingDate < today) return 'Already held: what it used is in the usage records.'
  return s.isMeeting ? null : 'The section does not meet on this date.'
}

/** The meetings in date order: what each draws per reagent (with overage), and the range's sessions. */
function scheduledDemand(
  input: ForecastInput, reagents: Map<number, ForecastReagent>, perUnit: Map<number, PerUnitNeeds>,
): ScheduledDemand {
  const practicals = new Map(input.practicals.map((p) => [p.id, p]))
  const out: ScheduledDemand = { sessions: [], skippedSessions: [], demands: new Map() }
  const ordered = [...input.sessions]
    .sort((a, b) => a.meetingDate.localeCompare(b.meetingDate) || a.sectionCode.localeCompare(b.sectionCode))
  for (const s of ordered) {
    const p = practicals.get(s.practicalId)
    const per = perUnit.get(s.practicalId)
    if (!p || !per || s.meetingDate > input.to) continue
    const inRange = s.meetingDate >= input.from
    const skip = skipReason(s, input.today)
    if (skip) {
      if (inRange) {
        out.skippedSessions.push({
          practicalId: p.id, practicalTitle: p.title, courseCode: p.courseCode, sectionCode: s.sectionCode, meetingDate: s.meetingDate,
          reason: skip,
        })
      }
      continue
    }
    for (const a of per.amounts) {
      const reagent = reagents.get(a.reagentId)!
      const list = out.demands.get(a.reagentId) ?? []
      const times = s.units * (1 + reagent.overagePercent / 100)
      const solution = a.solution ? { ...a.solution, ml: times * a.solution.ml } : null
      list.push({ date: s.meetingDate, amount: times * a.amount, inRange, solution })
      out.demands.set(a.reagentId, list)
    }
    if (!inRange) continue
    out.sessions.push({
      practicalId: p.id, practicalTitle: p.title, courseId: p.courseId, courseCode: p.courseCode, sectionId: s.sectionId,
      sectionCode: s.sectionCode,
      meetingDate: s.meetingDate, week: weekStart(s.meetingDate), students: s.students, units: s.units, workUnit: p.workUnit,
      halogenatedWasteMl: round(s.units * per.wasteMl, 1),
    })
  }
  return out
}

/** A reagent's lots in its own unit; a lot that cannot be converted is a problem, not stock. */
function lotsInReagentUnit(lots: ForecastLot[], reagent: ForecastReagent, problems: Set<string>) {
  return lots.filter((l) => l.reagentId === reagent.id).flatMap((l) => {
    const remaining = convertLot(l, reagent)
    if (remaining === null) problems.add(`${reagent.name}: a lot in ${l.unit} cannot be counted in ${reagent.unit} without a density.`)
    return remaining === null || remaining <= 0 ? [] : [{ id: l.id, remaining, expiresOn: l.expiresOn }]
  })
}

/** The prepared solutions among a line's demands, by name and strength, in mL of solution. */
function solutionsOf(demands: RangedDemand[]): ForecastSolution[] {
  const byKey = new Map<string, ForecastSolution>()
  for (const d of demands) {
    if (!d.solution) continue
    const key = `${d.solution.name}|${d.solution.percentWv}`
    const seen = byKey.get(key) ?? { name: d.solution.name, percentWv: d.solution.percentWv, solutionMl: 0 }
    seen.solutionMl += d.solution.ml
    byKey.set(key, seen)
  }
  return [...byKey.values()].map((x) => ({ ...x, solutionMl: round(x.solutionMl, 1) }))
}

/** One reagent's line: required in the range, on hand, the shortfall in whole containers, by week. */
function forecastLine(reagent: ForecastReagent, list: RangedDemand[], lotList: ForecastLot[], problems: Set<string>): ForecastLine | null {
  const inRange = list.filter((d) => d.inRange)
  if (!inRange.length) return null
  const lots = lotsInReagentUnit(lotList, reagent, problems)
  const { covered, drawn } = allocateStock(list, lots)
  const required = sum(inRange.map((d) => d.amount))
  const reservedEarlier = sum(list.filter((d) => !d.inRange).map((d) => d.amount))
  const coveredInRange = sum(list.map((d, i) => (d.inRange ? covered[i]! : 0)))
  const shortfall = Math.max(0, required - coveredInRange)
  // On hand: what the range draws, plus what is left in lots still in date at the last use.
  // Left over in a lot that expires sooner cannot be used: it is reported, not counted.
  const lastUse = inRange.at(-1)!.date
  const leftover = (l: { id: number, remaining: number }) => Math.max(0, l.remaining - (drawn.get(l.id) ?? 0))
  const lasts = (l: { expiresOn: string | null }) => l.expiresOn === null || l.expiresOn >= lastUse
  const onHand = coveredInRange + sum(lots.filter(lasts).map(leftover))
  const notCounted = sum(lots.filter((l) => !lasts(l)).map(leftover))
  const containers = shortfall > EPSILON ? Math.ceil(shortfall / reagent.containerSize - EPSILON) : 0
  const byWeek = new Map<string, number>()
  for (const d of inRange) byWeek.set(weekStart(d.date), (byWeek.get(weekStart(d.date)) ?? 0) + d.amount)
  return {
    reagentId: reagent.id, name: reagent.name, unit: reagent.unit,
    required: round(required), onHand: round(onHand), shortfall: round(shortfall), containers, containerSize: reagent.containerSize,
    overagePercent: reagent.overagePercent, orderQuantity: round(containers * reagent.containerSize),
    weeks: [...byWeek].map(([week, amount]) => ({ week, required: round(amount) })),
    reservedEarlier: round(reservedEarlier), notCounted: round(notCounted),
    supplierName: reagent.supplierName, hazards: reagent.hazards, solutions: solutionsOf(inRange),
  }
}

/** Every ISO week of the range, with its meetings and their halogenated waste. */
function forecastWeeks(from: string, to: string, sessions: ForecastSession[]): ForecastWeek[] {
  const weeks = new Map<string, ForecastWeek>()
  for (let week = weekStart(from); week <= to; week = addDays(week, 7)) {
    weeks.set(week, { week, isoWeek: isoWeekLabel(week), sessions: 0, halogenatedWasteMl: 0 })
  }
  for (const s of sessions) {
    const w = weeks.get(s.week)!
    w.sessions += 1
    w.halogenatedWasteMl = round(w.halogenatedWasteMl + s.halogenatedWasteMl, 1)
  }
  return [...weeks.values()]
}

/** The whole forecast: per reagent and ISO week, stock against it, and halogenated waste. */
export function buildForecast(input: ForecastInput): ForecastResult {
  const reagents = new Map(input.reagents.map((r) => [r.id, r]))
  const problems = new Set<string>()
  const perUnit = perUnitNeeds(input, reagents, problems)
  const { sessions, skippedSessions, demands } = scheduledDemand(input, reagents, perUnit)
  const lines = [...demands].flatMap(([reagentId, list]) => forecastLine(reagents.get(reagentId)!, list, input.lots, problems) ?? [])
  lines.sort((a, b) => a.name.localeCompare(b.name))
  return {
    lines,
    halogenatedWasteMl: round(sum(sessions.map((s) => s.halogenatedWasteMl)), 1),
    weeks: forecastWeeks(input.from, input.to, sessions),
    sessions,
    skippedSessions,
    problems: [...problems],
  }
}
