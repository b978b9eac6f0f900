import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../../support/db'
import { auditRows, instructorWithCourse, sectionOf, sharedMethod, sharedSubstrate, stubNitroGlobals } from '../arrange'
import {
  createPractical, deletePractical, setPracticalSessions, updatePractical,
} from '../../../server/services/practicals/practical-commands'

beforeAll(stubNitroGlobals)
afterAll(closeTestDb)

const itemsOf = (practicalId: number) => testDb().selectFrom('practicalItems').selectAll()
  .where('practicalId', '=', practicalId).orderBy('position').execute()
const practicalRow = (id: number) => testDb().selectFrom('practicals')
  .select(['id', 'courseId', 'title', 'substrateId', 'methodId', 'workUnit', 'notes', 'resultsReleasedAt'])
  .where('id', '=', id).executeTakeFirstOrThrow()

async function newPractical() {
  const world = await instructorWithCourse()
  const butane = await sharedSubstrate('butane')
  const chlorine = await sharedMethod('cl2-light')
  const id = await createPractical(testDb(), world.actor, world.me, world.course.id, {
    title: 'Chlorination of butane', substrateId: butane.id, methodId: chlorine.id, workUnit: 'pair', notes: '',
  })
  return { ...world, id, butane, chlorine }
}

describe('createPractical', () => {
  it('prefills the scale from the substrate and the method and audits the creation', async () => {
    const { id, actor } = await newPractical()
    const items = await itemsOf(id)
    // Chlorine and light: the substrate first, then chlorine as the halogenating agent (shared/data/halogenation-methods.ts).
    expect(items[0]).toMatchObject({ role: 'substrate', name: 'butane', smiles: 'CCCC' })
    expect(items.map((i) => i.role)).toContain('halogenating-agent')
    const [row] = await auditRows('practical.create', id)
    expect(row).toMatchObject({ actorId: actor.id, ip: '127.0.0.1' })
  })

  it('refuses a substrate of another instructor and writes nothing', async () => {
    const world = await instructorWithCourse()
    const other = await instructorWithCourse()
    const chlorine = await sharedMethod('cl2-light')
    const own = await testDb().insertInto('substrates')
      .values({ name: 'private propane', smiles: 'CCC', formula: 'C3H8', molarMass: 44.097, ownerId: other.me.id })
      .returning('id').executeTakeFirstOrThrow()
    await expect(createPractical(testDb(), world.actor, world.me, world.course.id, {
      title: 'Not mine', substrateId: own.id, methodId: chlorine.id, workUnit: 'pair', notes: '',
    })).rejects.toMatchObject({ statusCode: 400, data: { issues: [{ field: 'substrateId' }] } })
    const written = await testDb().selectFrom('practicals').select('id').where('courseId', '=', world.course.id).execute()
    expect(written).toEqual([])
  })
})

describe('updatePractical: the item-merge rule', () => {
  it('a new method replaces the reagent rows after the substrate and keeps the other rows and the substrate amount', async () => {
    const { id, actor, me } = await newPractical()
    // The instructor's own edits: a bigger substrate amount and a solvent row at the end.
    await testDb().updateTable('practicalItems').set({ amount: 25 }).where('practicalId', '=', id).where('role', '=', 'substrate').execute()
    const position = (await itemsOf(id)).length
    await testDb().insertInto('practicalItems')
      .values({ practicalId: id, position, role: 'solvent', name: 'dichloromethane', smiles: 'ClCCl', molarMass: 84.93, density: 1.33,
        basis: 'mL', amount: 5 })
      .execute()
    const sulfuryl = await sharedMethod('so2cl2-azo')
    await updatePractical(testDb(), actor, me, await practicalRow(id), { methodId: sulfuryl.id })

    const items = await itemsOf(id)
    expect(items[0]).toMatchObject({ role: 'substrate', name: 'butane', amount: 25 })
    expect(items.at(-1)).toMatchObject({ role: 'solvent', name: 'dichloromethane', amount: 5 })
    // Sulfuryl chloride with an azo initiator (SO2Cl2 = O=S(=O)(Cl)Cl): no chlorine row is left.
    const reagents = items.filter((i) => i.role === 'halogenating-agent' || i.role === 'initiator')
    expect(reagents.map((r) => r.smiles)).toContain('O=S(=O)(Cl)Cl')
    expect(reagents.map((r) => r.smiles)).not.toContain('ClCl')
    expect((await practicalRow(id)).methodId).toBe(sulfuryl.id)
    const [row] = await auditRows('practical.update', id)
    expect((row!.after as { items: unknown[] }).items).toHaveLength(items.length)
  })

  it('a new substrate takes over the substrate row but keeps its basis and amount', async () => {
    const { id, actor, me } = await newPractical()
    await testDb().updateTable('practicalItems').set({ amount: 12.5 }).where('practicalId', '=', id).where('role', '=', 'substrate')
      .execute()
    const reagentsBefore = (await itemsOf(id)).filter((i) => i.role !== 'substrate').map((i) => i.name)
    const methylpropane = await sharedSubstrate('2-methylpropane')
    await updatePractical(testDb(), actor, me, await practicalRow(id), { substrateId: methylpropane.id })
    const items = await itemsOf(id)
    expect(items[0]).toMatchObject({ role: 'substrate', name: '2-methylpropane', smiles: 'CC(C)C', amount: 12.5, basis: 'mmol' })
    expect(items.slice(1).map((i) => i.name)).toEqual(reagentsBefore)
  })

  it('a title alone leaves the scale untouched and the audit row without items', async () => {
    const { id, actor, me } = await newPractical()
    const before = await itemsOf(id)
    await updatePractical(testDb(), actor, me, await practicalRow(id), { title: 'Renamed' })
    expect(await itemsOf(id)).toEqual(before)
    const [row] = await auditRows('practical.update', id)
    expect(row!.after).toEqual({ title: 'Renamed' })
  })
})

describe('setPracticalSessions', () => {
  it('stores a meeting with the default due date and refuses a date that is not a meeting, keeping what was stored', async () => {
    const { id, actor, course } = await newPractical()
    const section = await sectionOf(course.id)
    await setPracticalSessions(testDb(), actor, id, course, [{ sectionId: section.id, meetingDate: '2027-01-18' }])
    const stored = await testDb().selectFrom('practicalSessions').selectAll().where('practicalId', '=', id).execute()
    expect(stored).toHaveLength(1)
    expect(stored[0]!.dueAt.getTime()).toBeGreaterThan(Date.parse('2027-01-18T22:00:00Z'))

    // 2027-01-19 is a Tuesday: the section meets on Mondays.
    await expect(setPracticalSessions(testDb(), actor, id, course, [{ sectionId: section.id, meetingDate: '2027-01-19' }]))
      .rejects.toMatchObject({ statusCode: 400, data: { issues: [{ field: 'sessions.0.meetingDate' }] } })
    const after = await testDb().selectFrom('practicalSessions').select('meetingDate').where('practicalId', '=', id).execute()
    expect(after).toEqual([{ meetingDate: '2027-01-18' }])
    expect(await auditRows('practical.sessions', id)).toHaveLength(1)
  })
})

describe('deletePractical', () => {
  it('refuses once results are released and deletes with an audit row otherwise', async () => {
    const { id, actor } = await newPractical()
    const released = { ...(await practicalRow(id)), resultsReleasedAt: new Date() }
    await expect(deletePractical(testDb(), actor, released)).rejects.toMatchObject({ statusCode: 409 })
    expect(await testDb().selectFrom('practicals').select('id').where('id', '=', id).execute()).toHaveLength(1)

    await deletePractical(testDb(), actor, await practicalRow(id))
    expect(await testDb().selectFrom('practicals').select('id').where('id', '=', id).execute()).toEqual([])
    expect(await itemsOf(id)).toEqual([])
    const [row] = await auditRows('practical.delete', id)
    expect((row!.before as { title: string }).title).toBe('Chlorination of butane')
  })
})
