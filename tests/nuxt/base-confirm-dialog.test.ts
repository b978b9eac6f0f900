import { afterEach, describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import { flushPromises } from '@vue/test-utils'
import BaseConfirmDialog from '~/components/base/BaseConfirmDialog.vue'

async function openDialog(options: Parameters<ReturnType<typeof useConfirm>['confirm']>[0]) {
  const wrapper = await mountSuspended(BaseConfirmDialog, { attachTo: document.body })
  const { confirm } = useConfirm()
  const answer = confirm(options)
  await flushPromises()
  return { wrapper, answer }
}

describe('BaseConfirmDialog with useConfirm', () => {
  let cleanup: (() => void) | undefined
  afterEach(() => {
    useConfirm().answer(false)
    cleanup?.()
  })

  it('opens as a modal with the question and resolves true on confirm', async () => {
    const { wrapper, answer } = await openDialog({ title: 'Exclude this run?', message: 'It leaves the class statistics.', confirmLabel: 'Exclude run', tone: 'danger' })
    cleanup = () => wrapper.unmount()
    const dialog = wrapper.get('dialog')
    expect((dialog.element as HTMLDialogElement).open).toBe(true)
    expect(dialog.get(`[id="${dialog.attributes('aria-labelledby')}"]`).text()).toBe('Exclude this run?')
    expect(dialog.get(`[id="${dialog.attributes('aria-describedby')}"]`).text()).toBe('It leaves the class statistics.')
    expect(wrapper.get('[data-test="confirm-accept"]').text()).toBe('Exclude run')

    await wrapper.get('[data-test="confirm-accept"]').trigger('click')
    await expect(answer).resolves.toBe(true)
    await flushPromises()
    expect((dialog.element as HTMLDialogElement).open).toBe(false)
  })

  it('resolves false on cancel', async () => {
    const { wrapper, answer } = await openDialog({ title: 'Return for resubmission?' })
    cleanup = () => wrapper.unmount()
    await wrapper.get('[data-test="confirm-cancel"]').trigger('click')
    await expect(answer).resolves.toBe(false)
  })

  it('resolves false when Esc cancels the dialog', async () => {
    const { wrapper, answer } = await openDialog({ title: 'Discard this comment?' })
    cleanup = () => wrapper.unmount()
    wrapper.get('dialog').element.dispatchEvent(new Event('cancel', { cancelable: true }))
    await expect(answer).resolves.toBe(false)
  })

  it('puts focus on Cancel for a destructive question and gives it back afterwards', async () => {
    const opener = document.createElement('button')
    opener.textContent = 'Exclude'
    document.body.appendChild(opener)
    opener.focus()
    const { wrapper, answer } = await openDialog({ title: 'Delete section?', tone: 'danger' })
    cleanup = () => { wrapper.unmount(); opener.remove() }
    expect(document.activeElement).toBe(wrapper.get('[data-test="confirm-cancel"]').element)

    await wrapper.get('[data-test="confirm-cancel"]').trigger('click')
    await answer
    await flushPromises()
    expect(document.activeElement).toBe(opener)
  })

  it('answers an earlier question "no" when a newer one replaces it', async () => {
    const { wrapper, answer: first } = await openDialog({ title: 'First?' })
    cleanup = () => wrapper.unmount()
    const second = useConfirm().confirm({ title: 'Second?' })
    await expect(first).resolves.toBe(false)
    await flushPromises()
    expect(wrapper.get('h2').text()).toBe('Second?')
    await wrapper.get('[data-test="confirm-accept"]').trigger('click')
    await expect(second).resolves.toBe(true)
  })
})
