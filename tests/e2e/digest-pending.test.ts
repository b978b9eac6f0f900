import { afterAll, describe, expect, it } from 'vitest'
import { signedIn } from '../support/http'
import { closeTestDb, testDb } from '../support/db'
import { insertRichResult, makeNamedCourse } from '../support/results'

afterAll(closeTestDb)

describe('the digest before it goes out', () => {
  it('the preview reports the runs still waiting for review per section, and the message says how many runs it counts', async () => {
    const world = await makeNamedCourse({ sections: 2, studentsPerSection: 3 })
    const [a, b, c, d, e, f] = world.students
    await insertRichResult(world.practicalId, a!, { secondary: 3.2 })
    await insertRichResult(world.practicalId, b!, { secondary: 3.6, status: 'pending' })
    await insertRichResult(world.practicalId, c!, { secondary: 2.9, status: 'pending' })
    await insertRichResult(world.practicalId, d!, { secondary: 3.4, status: 'pending' })
    // Neither counted nor waiting: a reviewer left one out, and a returned run waits for its student.
    await insertRichResult(world.practicalId, e!, { secondary: 19.0, status: 'pending', excluded: 'Solvent integrated as a product' })
    await insertRichResult(world.practicalId, f!, { secondary: 3.1, status: 'returned' })
    const [s1, s2] = world.sections

    const owner = await signedIn(world.owner.email, world.owner.password)
    const preview = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${s1!.id}&audience=student`)
    expect(preview.status).toBe(200)
    expect(preview.body.pendingReview).toEqual({
      total: 3,
      sections: [{ sectionId: s1!.id, code: 'S1', count: 2 }, { sectionId: s2!.id, code: 'S2', count: 1 }],
    })
    expect(preview.body.countedRuns).toBe(4)
    expect(preview.body.text).toContain(
      'These class figures count 4 runs (accepted or waiting for review); 3 of them are still waiting for review, so the figures may change.')

    // A TA is warned about their own section only; the message itself is the same for everyone.
    const ta = await signedIn(s2!.ta.email, s2!.ta.password)
    const taPreview = await ta.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${s2!.id}&audience=staff`)
    expect(taPreview.status).toBe(200)
    expect(taPreview.body.pendingReview).toEqual({ total: 1, sections: [{ sectionId: s2!.id, code: 'S2', count: 1 }] })
    expect(taPreview.body.text).toContain('3 of them are still waiting for review')

    // Once every run is reviewed the warning is gone and the message says so.
    await testDb().updateTable('submissions').set({ status: 'accepted' })
      .where('practicalId', '=', world.practicalId).where('status', '=', 'pending').execute()
    const after = await owner.get(`/api/practicals/${world.practicalId}/digests/preview?sectionId=${s1!.id}&audience=student`)
    expect(after.body.pendingReview).toEqual({ total: 0, sections: [] })
    expect(after.body.text).toContain('These class figures count 4 runs (accepted or waiting for review); every one of them has been reviewed.')
  })
})
