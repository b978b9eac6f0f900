import { describe, expect, it } from 'vitest'
import { defineComponent, h } from 'vue'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BaseTime from '~/components/base/BaseTime.vue'

// A page about a course provides its zone once; every <BaseTime> below it uses it. The
// instant: 03:00 UTC on 11 Dec 2026, the evening of 10 Dec in Chicago (CST, UTC-6; IANA tz
// database), midday of 11 Dec in Tokyo (UTC+9).
const AT = '2026-12-11T03:00:00Z'

function coursePage(zone: string | null, child: () => ReturnType<typeof h>) {
  return defineComponent({
    setup() {
      provideCourseZone(() => zone)
      return child
    },
  })
}

describe('<BaseTime> and the course zone', () => {
  it('shows a moment on the provided course’s wall clock', async () => {
    const wrapper = await mountSuspended(coursePage('America/Chicago', () => h(BaseTime, { at: AT })))
    expect(wrapper.text()).toBe('Thu 10 Dec 2026, 21:00')
    expect(wrapper.get('time').attributes('datetime')).toBe(AT)
  })

  it('lets a zone given to it win over the page’s', async () => {
    const wrapper = await mountSuspended(coursePage('America/Chicago', () => h(BaseTime, { at: AT, zone: 'Asia/Tokyo', dateOnly: true })))
    expect(wrapper.text()).toBe('Fri 11 Dec 2026')
  })

  it('falls back to the reader’s own zone outside a course', async () => {
    useTimeZone().value = 'Asia/Tokyo'
    const wrapper = await mountSuspended(coursePage(null, () => h(BaseTime, { at: AT })))
    expect(wrapper.text()).toBe('Fri 11 Dec 2026, 12:00')
    useTimeZone().value = 'UTC'
    await nextTick()
    expect(wrapper.text()).toBe('Fri 11 Dec 2026, 03:00')
  })

  it('shows a calendar date as written, and a dash for none', async () => {
    const date = await mountSuspended(coursePage('Pacific/Kiritimati', () => h(BaseTime, { at: '2026-12-10', dateOnly: true })))
    expect(date.text()).toBe('Thu 10 Dec 2026')
    const none = await mountSuspended(coursePage('America/Chicago', () => h(BaseTime, { at: null })))
    expect(none.text()).toBe('—')
    expect(none.find('time').exists()).toBe(false)
  })
})
