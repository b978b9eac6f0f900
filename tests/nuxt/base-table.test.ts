import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BaseTable from '~/components/base/BaseTable.vue'

const rows = [
  { id: 1, student: 'Ines Varga', ratio: 3.9 },
  { id: 2, student: 'Ada Quill', ratio: 3.1 },
  { id: 3, student: 'Tomasz Reyes', ratio: 4.4 },
  { id: 4, student: 'Callum Abara', ratio: 2.8 },
  { id: 5, student: 'Priya Holm', ratio: 3.6 },
]
const columns = [
  { key: 'student', label: 'Student' },
  { key: 'ratio', label: '2°:1° per H', numeric: true },
]

async function mountTable(props: Record<string, unknown> = {}) {
  return mountSuspended(BaseTable, { props: { rows, columns, caption: 'Results', pageSize: 0, ...props } })
}

function firstColumn(wrapper: Awaited<ReturnType<typeof mountTable>>) {
  return wrapper.findAll('[data-test="table-row"]').map((row) => row.find('td').text())
}

describe('BaseTable sorting', () => {
  it('keeps the given order until a column is sorted', async () => {
    const wrapper = await mountTable()
    expect(firstColumn(wrapper)).toEqual(['Ines Varga', 'Ada Quill', 'Tomasz Reyes', 'Callum Abara', 'Priya Holm'])
    expect(wrapper.findAll('th[aria-sort]')).toHaveLength(0)
  })

  it('sorts text ascending on the first click and descending on the second, with aria-sort', async () => {
    const wrapper = await mountTable()
    const button = wrapper.get('[data-test="sort-student"]')
    expect(button.element.tagName).toBe('BUTTON')

    await button.trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Ada Quill', 'Callum Abara', 'Ines Varga', 'Priya Holm', 'Tomasz Reyes'])
    expect(wrapper.findAll('th')[0]!.attributes('aria-sort')).toBe('ascending')

    await button.trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Tomasz Reyes', 'Priya Holm', 'Ines Varga', 'Callum Abara', 'Ada Quill'])
    expect(wrapper.findAll('th')[0]!.attributes('aria-sort')).toBe('descending')
  })

  it('sorts numbers by value, not as text', async () => {
    const wrapper = await mountTable({ rows: [...rows, { id: 6, student: 'Lio Tanaka', ratio: 12.5 }] })
    await wrapper.get('[data-test="sort-ratio"]').trigger('click')
    const ratios = wrapper.findAll('[data-test="table-row"]').map((row) => row.findAll('td')[1]!.text())
    expect(ratios).toEqual(['2.8', '3.1', '3.6', '3.9', '4.4', '12.5'])
    expect(wrapper.findAll('th')[0]!.attributes('aria-sort')).toBeUndefined()
    expect(wrapper.findAll('th')[1]!.attributes('aria-sort')).toBe('ascending')
  })

  it('keeps the chosen order when new rows arrive', async () => {
    const wrapper = await mountTable()
    await wrapper.get('[data-test="sort-student"]').trigger('click')
    await wrapper.setProps({ rows: [...rows, { id: 7, student: 'Aaron Brill', ratio: 3.3 }] })
    expect(firstColumn(wrapper).slice(0, 2)).toEqual(['Aaron Brill', 'Ada Quill'])
  })

  it('starts from initialSort', async () => {
    const wrapper = await mountTable({ initialSort: { key: 'ratio', desc: true } })
    expect(firstColumn(wrapper)[0]).toBe('Tomasz Reyes')
  })
})

describe('BaseTable paging and filtering', () => {
  it('shows one page at a time and moves between pages', async () => {
    const wrapper = await mountTable({ pageSize: 2 })
    expect(firstColumn(wrapper)).toEqual(['Ines Varga', 'Ada Quill'])
    expect(wrapper.get('[data-test="pager-range"]').text()).toBe('Rows 1–2 of 5')
    expect(wrapper.get('[data-test="pager-previous"]').attributes('disabled')).toBeDefined()

    await wrapper.get('[data-test="pager-next"]').trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Tomasz Reyes', 'Callum Abara'])
    expect(wrapper.get('[data-test="pager-range"]').text()).toBe('Rows 3–4 of 5')

    await wrapper.get('[data-test="pager-next"]').trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Priya Holm'])
    expect(wrapper.get('[data-test="pager-next"]').attributes('disabled')).toBeDefined()

    await wrapper.get('[data-test="pager-previous"]').trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Tomasz Reyes', 'Callum Abara'])
  })

  it('sorts across all pages, not just the visible one', async () => {
    const wrapper = await mountTable({ pageSize: 2 })
    await wrapper.get('[data-test="sort-ratio"]').trigger('click')
    expect(firstColumn(wrapper)).toEqual(['Callum Abara', 'Ada Quill'])
  })

  it('hides the pager when everything fits on one page', async () => {
    const wrapper = await mountTable({ pageSize: 10 })
    expect(wrapper.find('[data-test="pager-range"]').exists()).toBe(false)
    expect(wrapper.findAll('[data-test="table-row"]')).toHaveLength(5)
  })

  it('filters rows by text and says so when nothing matches', async () => {
    const wrapper = await mountTable({ filterable: true })
    const input = wrapper.get('input[type="search"]')
    await input.setValue('ho')
    expect(firstColumn(wrapper)).toEqual(['Priya Holm'])
    await input.setValue('zz')
    expect(wrapper.findAll('[data-test="table-row"]')).toHaveLength(0)
    expect(wrapper.text()).toContain('No rows match')
  })

  it('renders a cell slot with the row and value', async () => {
    const wrapper = await mountSuspended(BaseTable, {
      props: { rows, columns, caption: 'Results', pageSize: 0 },
      slots: {
        'cell-ratio': ({ value, row }: { value: unknown, row: object }) => `#${(row as { id: number }).id}:${(value as number).toFixed(2)}`,
      },
    })
    expect(wrapper.findAll('[data-test="table-row"]')[0]!.findAll('td')[1]!.text()).toBe('#1:3.90')
  })
})
