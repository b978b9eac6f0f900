import { sectionMeetings } from '../../../shared/utils/schedule'
import { defaultDueAt, type ItemSpec } from '../../../shared/utils/procedure'
import { molarMassOf } from '../../../shared/utils/halogenation'
import { findMethod } from '../../../shared/data/halogenation-methods'
import { addDays, weekStart } from '../../../shared/utils/dates'
import type { SeedContext } from './context'

// The two demo practicals of CHEM 2240: practical 1 met four weeks before the seeding week
// (results are in), practical 2 meets the week after next (the stockroom prepares for it).
// Scale per pair at a hood station, the usual teaching-lab size (common practice).

const WASH: ItemSpec = {
  role: 'wash',
  name: 'aqueous sodium bicarbonate, 5 % (two 10 mL portions)',
  smiles: null,
  molarMass: null,
  density: null,
  basis: 'mL',
  amount: 20,
}
const DRYING: ItemSpec = {
  role: 'drying-agent',
  name: 'anhydrous magnesium sulfate',
  smiles: null,
  molarMass: null,
  density: null,
  basis: 'g',
  amount: 1,
}

interface DemoPractical {
  key: 'p1' | 'p2'
  title: string
  substrate: string
  reagent: 'so2cl2-azo' | 'cl2-light'
  /** Monday of the week each section meets for it. */
  week: string
  notes: string
  reagents: () => ItemSpec[]
}

/** A method reagent from shared/data, its molar mass from the structure (IUPAC weights). */
function reagentItem(methodKey: string, smiles: string, role: ItemSpec['role'], basis: ItemSpec['basis'], amount: number): ItemSpec {
  const reagent = findMethod(methodKey)!.reagents.find((r) => r.smiles === smiles)!
  const molarMass = Number(molarMassOf(smiles).molarMass.toFixed(3))
  return { role, name: reagent.name, smiles, molarMass, density: reagent.density, basis, amount }
}

function demoPracticals(today: string): DemoPractical[] {
  const week0 = weekStart(today)
  return [
    {
      key: 'p1',
      title: 'Chlorination of 1-chlorobutane',
      substrate: '1-chlorobutane',
      reagent: 'so2cl2-azo',
      week: addDays(week0, -28),
      notes: 'Run neat under reflux with a gas trap on the condenser. Analyse the dichlorobutane mixture by GC.',
      reagents: () => [
        reagentItem('so2cl2-aibn', 'O=S(=O)(Cl)Cl', 'halogenating-agent', 'equivalents', 1),
        reagentItem('so2cl2-aibn', 'CC(C)(C#N)N=NC(C)(C)C#N', 'initiator', 'mol-percent', 2),
      ],
    },
    {
      key: 'p2',
      title: 'Photochlorination of 2,3-dimethylbutane',
      substrate: '2,3-dimethylbutane',
      reagent: 'cl2-light',
      week: addDays(week0, 7),
      notes: 'Chlorine from the hood supply, metered by mass; lamp shielded. Analyse the two monochlorides by GC.',
      // Half an equivalent of chlorine: with the alkane in excess the monochlorides seldom meet
      // a second chlorine atom, so dichlorides stay minor and the GC shows the per-H selectivity.
      reagents: () => [reagentItem('cl2-light', 'ClCl', 'halogenating-agent', 'equivalents', 0.5)],
    },
  ]
}

export async function seedPracticals(ctx: SeedContext): Promise<void> {
  const { db } = ctx
  const courseId = ctx.ids.courseId
  if (!courseId) throw new Error('seedPracticals: the course part of the seed must run first (no course id)')
  const course = await db.selectFrom('courses').select('timezone').where('id', '=', courseId).executeTakeFirstOrThrow()
  const sections = await db.selectFrom('sections').selectAll().where('courseId', '=', courseId).orderBy('code').execute()

  for (const demo of demoPracticals(ctx.today)) {
    const substrate = await db.selectFrom('substrates').selectAll()
      .where('id', '=', ctx.ids.substrates.get(demo.substrate) ?? -1).executeTakeFirst()
      ?? await db.selectFrom('substrates').selectAll().where('name', '=', demo.substrate).where('ownerId', 'is', null).executeTakeFirst()
    const method = await db.selectFrom('methods').selectAll()
      .where('id', '=', ctx.ids.methods.get(demo.reagent) ?? -1).executeTakeFirst()
      ?? await db.selectFrom('methods').selectAll()
        .where('reagent', '=', demo.reagent).where('ownerId', 'is', null).orderBy('id').executeTakeFirst()
    if (!substrate || !method) {
      const missing = !substrate ? `substrate "${demo.substrate}"` : `method with reagent "${demo.reagent}"`
      throw new Error(`seedPracticals: the library seed has no ${missing}; seedLibrary must run first`)
    }

    const practical = await db.insertInto('practicals').values({
      courseId, title: demo.title, substrateId: substrate.id, methodId: method.id, workUnit: 'pair', notes: demo.notes,
    }).returning('id').executeTakeFirstOrThrow()
    ctx.ids.practicals.set(demo.key, practical.id)

    const substrateItem: ItemSpec = {
      role: 'substrate',
      name: substrate.name,
      smiles: substrate.smiles,
      molarMass: substrate.molarMass,
      density: substrate.density,
      basis: 'mmol',
      amount: 10,
    }
    const items = [substrateItem, ...demo.reagents(), WASH, DRYING]
    await db.insertInto('practicalItems')
      .values(items.map((item, position) => ({ practicalId: practical.id, position, ...item })))
      .execute()

    const weekEnd = addDays(demo.week, 6)
    const sessions = sections.flatMap((s) => {
      const meeting = sectionMeetings({ ...s, timezone: course.timezone }).find((m) => m.date >= demo.week && m.date <= weekEnd)
      if (!meeting) return []
      return [{ practicalId: practical.id, sectionId: s.id, meetingDate: meeting.date, dueAt: defaultDueAt(meeting.date, course.timezone) }]
    })
    if (sessions.length) await db.insertInto('practicalSessions').values(sessions).execute()
  }
}
