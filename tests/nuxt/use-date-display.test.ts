import { describe, expect, it } from 'vitest'
import { defineComponent, h } from 'vue'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import StockroomWeeklyTable from '~/components/stockroom/StockroomWeeklyTable.vue'

// Zones from the IANA tz database: on 10 Dec 2026 Chicago keeps CST (UTC-6), Tokyo UTC+9.
// A deadline at 23:59 on 10 Dec in Chicago is 05:59 UTC on 11 Dec.
const DEADLINE = '2026-12-11T05:59:00Z'
// 14:00 on 10 Dec in Chicago, 20:00 UTC, 05:00 on 11 Dec in Tokyo.
const NOW = new Date('2026-12-10T20:00:00Z')

/** What useDateDisplay gives a component below a course page that provided `zone`. */
async function shownUnder(zone: string | null, own?: string) {
  let dates: ReturnType<typeof useDateDisplay> | undefined
  const child = defineComponent({
    setup() {
      dates = useDateDisplay(own ? () => own : undefined)
      return () => h('span')
    },
  })
  await mountSuspended(defineComponent({
    setup() {
      provideCourseZone(() => zone)
      return () => h(child)
    },
  }))
  return dates!
}

describe('useDateDisplay', () => {
  it('reads the course’s wall clock: the deadline is tonight, and today is still 10 Dec', async () => {
    useTimeZone().value = 'Asia/Tokyo'
    const dates = await shownUnder('America/Chicago')
    expect(dates.zone.value).toBe('America/Chicago')
    expect(dates.dateTime(DEADLINE)).toBe('Thu 10 Dec 2026, 23:59')
    expect(dates.time(DEADLINE)).toBe('23:59')
    expect(dates.daysFrom(DEADLINE, NOW)).toBe('today')
    expect(dates.today(NOW)).toBe('2026-12-10')
    useTimeZone().value = 'UTC'
  })

  it('a zone of the component’s own wins: in UTC the same deadline falls tomorrow', async () => {
    const dates = await shownUnder('America/Chicago', 'UTC')
    expect(dates.zone.value).toBe('UTC')
    expect(dates.dateTime(DEADLINE)).toBe('Fri 11 Dec 2026, 05:59')
    expect(dates.daysFrom(DEADLINE, NOW)).toBe('tomorrow')
  })

  it('outside a course it follows the reader’s zone', async () => {
    useTimeZone().value = 'Asia/Tokyo'
    const dates = await shownUnder(null)
    expect(dates.zone.value).toBe('Asia/Tokyo')
    expect(dates.dateTime(DEADLINE)).toBe('Fri 11 Dec 2026, 14:59')
    expect(dates.today(NOW)).toBe('2026-12-11')
    useTimeZone().value = 'UTC'
  })
})

describe('the forecast weeks', () => {
  it('head each column "Week of 30 Nov", from the Monday the server sends', async () => {
    // 30 Nov 2026 is the Monday of ISO week 2026-W49 (ISO 8601 week numbering).
    const weeks = [
      { week: '2026-11-30', isoWeek: '2026-W49', sessions: 2, halogenatedWasteMl: 40 },
      { week: '2026-12-07', isoWeek: '2026-W50', sessions: 0, halogenatedWasteMl: 0 },
    ]
    const wrapper = await mountSuspended(StockroomWeeklyTable, { props: { lines: [], weeks } })
    const heads = wrapper.findAll('thead th').map((th) => th.text())
    expect(heads).toEqual(['Reagent', 'Week of 30 Nov', 'Week of 7 Dec'])
  })
})
