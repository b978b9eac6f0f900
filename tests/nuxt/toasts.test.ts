import { afterEach, describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BaseToastRegion from '~/components/base/BaseToastRegion.vue'
import { useToastStore } from '~/stores/toasts'

describe('toasts', () => {
  afterEach(() => useToastStore().clear())

  it('announces problems assertively and good news politely', async () => {
    const wrapper = await mountSuspended(BaseToastRegion, { global: { stubs: { TransitionGroup: false } } })
    const toast = useToast()
    toast.error('Upload failed', 'Row 4 has no area value.')
    toast.success('Password changed')
    await nextTick()

    const assertive = wrapper.get('ol[aria-live="assertive"]')
    const polite = wrapper.get('ol[aria-live="polite"]')
    expect(assertive.text()).toContain('Upload failed')
    expect(assertive.text()).toContain('Row 4 has no area value.')
    expect(polite.text()).toContain('Password changed')
    expect(polite.text()).not.toContain('Upload failed')
  })

  it('keeps problems until dismissed and closes them by their button', async () => {
    const wrapper = await mountSuspended(BaseToastRegion, { global: { stubs: { TransitionGroup: false } } })
    useToast().error('Upload failed')
    await nextTick()
    expect(useToastStore().toasts[0]!.timeout).toBe(0)

    await wrapper.get('button[aria-label="Dismiss: Upload failed"]').trigger('click')
    expect(useToastStore().toasts).toHaveLength(0)
  })

  it('shows at most four at once, dropping the oldest', () => {
    const { push } = useToast()
    for (let i = 1; i <= 6; i++) push({ title: `Saved ${i}` })
    expect(useToastStore().toasts.map((t) => t.title)).toEqual(['Saved 3', 'Saved 4', 'Saved 5', 'Saved 6'])
  })
})
