import { describe, expect, it } from 'vitest'
import { mountSuspended } from '@nuxt/test-utils/runtime'
import BaseField from '~/components/base/BaseField.vue'

describe('BaseField', () => {
  it('labels the input and wires hint and error through aria-describedby', async () => {
    const wrapper = await mountSuspended(BaseField, {
      props: { label: 'Scale (mmol)', hint: 'Per student pair.', error: 'Use a positive number.', type: 'number', modelValue: -1 },
    })
    const input = wrapper.get('input')
    const label = wrapper.get('label')
    expect(label.attributes('for')).toBe(input.attributes('id'))
    expect(input.attributes('aria-invalid')).toBe('true')

    const describedBy = input.attributes('aria-describedby')!.split(' ')
    expect(describedBy).toHaveLength(2)
    const texts = describedBy.map((id) => wrapper.get(`[id="${id}"]`).text())
    expect(texts).toEqual(['Per student pair.', 'Use a positive number.'])
  })

  it('is not marked invalid and points only at the hint without an error', async () => {
    const wrapper = await mountSuspended(BaseField, { props: { label: 'E-mail', hint: 'Your course address.' } })
    const input = wrapper.get('input')
    expect(input.attributes('aria-invalid')).toBeUndefined()
    expect(input.attributes('aria-describedby')).toBe(wrapper.get('.field-hint').attributes('id'))
  })

  it('has no aria-describedby when there is nothing to describe', async () => {
    const wrapper = await mountSuspended(BaseField, { props: { label: 'E-mail' } })
    expect(wrapper.get('input').attributes('aria-describedby')).toBeUndefined()
  })

  it('passes attributes such as autocomplete to the input, not the wrapper', async () => {
    const wrapper = await mountSuspended(BaseField, { props: { label: 'Password', type: 'password' }, attrs: { autocomplete: 'current-password' } })
    expect(wrapper.get('input').attributes('autocomplete')).toBe('current-password')
    expect(wrapper.get('input').attributes('type')).toBe('password')
  })

  it('emits numbers from a number input and null when cleared', async () => {
    const wrapper = await mountSuspended(BaseField, { props: { label: 'Scale', type: 'number', modelValue: null } })
    await wrapper.get('input').setValue('2.5')
    await wrapper.get('input').setValue('')
    expect(wrapper.emitted('update:modelValue')).toEqual([[2.5], [null]])
  })
})
