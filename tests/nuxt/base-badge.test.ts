import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BaseBadge from '~/components/base/BaseBadge.vue'

describe('BaseBadge', () => {
  const tones = ['neutral', 'ok', 'warning', 'danger', 'info', 'caution', 'accent'] as const

  it.each(tones)('tone %s shows its words and an icon, not colour alone', async (tone) => {
    const wrapper = await mountSuspended(BaseBadge, { props: { tone, label: `Status ${tone}` } })
    expect(wrapper.text()).toBe(`Status ${tone}`)
    expect(wrapper.find('svg').exists()).toBe(true)
    // The icon is decoration for the words; screen readers hear the text once.
    expect(wrapper.get('svg').attributes('aria-hidden')).toBe('true')
  })

  it('uses slot text when given', async () => {
    const wrapper = await mountSuspended(BaseBadge, { props: { tone: 'danger' }, slots: { default: () => 'Split peak' } })
    expect(wrapper.text()).toBe('Split peak')
  })

  it('gives different tones different icons', async () => {
    const ok = await mountSuspended(BaseBadge, { props: { tone: 'ok', label: 'Accepted' } })
    const danger = await mountSuspended(BaseBadge, { props: { tone: 'danger', label: 'Accepted' } })
    expect(ok.get('path').attributes('d')).not.toBe(danger.get('path').attributes('d'))
  })
})
