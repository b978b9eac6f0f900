import { afterEach, describe, expect, it } from 'vitest'
import { registerEndpoint } from '@nuxt/test-utils/runtime'
import { createError, readBody } from 'h3'
import { useToastStore } from '~/stores/toasts'

// useSubmit against endpoints of the test app, answered the way Halocline's routes answer: a
// saved object, a 400 whose data.issues name the fields, a 409 with conflicts, a 503.
registerEndpoint('/test-submit/sections', {
  method: 'POST',
  handler: async (event) => {
    const body = await readBody<{ code?: string, confirmConflicts?: boolean }>(event)
    if (!body.code) throw createError({ statusCode: 400, statusMessage: 'code: Enter a section code', data: { issues: [{ field: 'code', message: 'Enter a section code' }] } })
    if (body.code === 'M1' && !body.confirmConflicts) throw createError({ statusCode: 409, statusMessage: 'Room double-booked', data: { conflicts: [{ message: 'Room 214 is booked twice' }] } })
    return { id: 7, code: body.code }
  },
})
registerEndpoint('/test-submit/down', { method: 'POST', handler: () => { throw createError({ statusCode: 503, statusMessage: 'The database is unavailable; try again shortly' }) } })

const titles = () => useToastStore().toasts.map((t) => `${t.tone}: ${t.title}${t.message ? ` / ${t.message}` : ''}`)

interface Saved { id: number, code: string }
const save = (code: string, confirmConflicts = false) => () => $fetch<Saved>('/test-submit/sections', { method: 'POST', body: { code, confirmConflicts } })

describe('useSubmit', () => {
  afterEach(() => useToastStore().clear())

  it('is busy while the request and its follow-up run, then toasts and hands over the answer', async () => {
    const { busy, run } = useSubmit()
    const seen: Array<{ busy: boolean, id?: number }> = []
    const pending = run(save('W1'), {
      success: (saved) => `Section ${saved.code} added`,
      done: (saved) => { seen.push({ busy: busy.value, id: saved.id }) },
    })
    expect(busy.value).toBe(true)
    expect(await pending).toBe(true)
    expect(busy.value).toBe(false)
    expect(seen).toEqual([{ busy: true, id: 7 }])
    expect(titles()).toEqual(['ok: Section W1 added'])
  })

  it('puts the server’s field errors beside their fields, with no toast', async () => {
    const form = useFormErrors()
    const { busy, run } = useSubmit(form)
    let done = false
    expect(await run(save(''), { success: 'Saved', done: () => { done = true } })).toBe(false)
    expect(form.errors.code).toBe('Enter a section code')
    expect(form.general.value).toBeNull()
    expect(done).toBe(false)
    expect(busy.value).toBe(false)
    expect(titles()).toEqual([])
  })

  it('tells a failure in a toast: with the server’s sentence, a fixed one, or a default', async () => {
    const { run } = useSubmit()
    await run(() => $fetch('/test-submit/down', { method: 'POST' }), { failure: { title: 'Nothing was accepted', message: serverSentence } })
    await run(() => $fetch('/test-submit/down', { method: 'POST' }), { failure: { title: 'The address was not replaced', message: 'Please try again shortly.' } })
    await run(() => $fetch('/test-submit/down', { method: 'POST' }), { failure: 'No sheet was started' })
    await run(() => $fetch('/test-submit/down', { method: 'POST' }))
    expect(titles()).toEqual([
      'danger: Nothing was accepted / The database is unavailable; try again shortly',
      'danger: The address was not replaced / Please try again shortly.',
      'danger: No sheet was started',
      'danger: That did not work / The database is unavailable; try again shortly',
    ])
  })

  it('lets onError ask and send again once busy is cleared (a 409 to confirm)', async () => {
    const form = useFormErrors()
    const { busy, run } = useSubmit(form)
    const statuses: number[] = []
    let busyWhenAsked: boolean | null = null
    async function submit(confirmConflicts = false): Promise<boolean> {
      return run(save('M1', confirmConflicts), {
        success: 'Section M1 saved',
        onError: async (_error, status) => {
          statuses.push(status)
          busyWhenAsked = busy.value
          if (status === 409) await submit(true)
        },
      })
    }
    await submit()
    expect(statuses).toEqual([409])
    expect(busyWhenAsked).toBe(false)
    expect(form.general.value).toBe('Room double-booked')
    expect(titles()).toEqual(['ok: Section M1 saved'])
    expect(busy.value).toBe(false)
  })

  it('names which action runs, and counts an error in the follow-up as a failure', async () => {
    const { busy, running, run } = useSubmit<'copy' | 'delete'>()
    const pending = run(save('T1'), {
      key: 'copy',
      done: () => { throw new Error('navigation failed') },
      failure: 'No copy was made',
    })
    expect(running.value).toBe('copy')
    expect(busy.value).toBe(true)
    expect(await pending).toBe(false)
    expect(running.value).toBeNull()
    expect(titles()).toEqual(['danger: No copy was made'])
  })
})
