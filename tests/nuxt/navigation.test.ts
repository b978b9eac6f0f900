import { describe, expect, it } from 'vitest'
import { isNavActive, navigationFor } from '~/utils/navigation'

const routes = (role: string, demo = false) => navigationFor(role, { demo }).map((item) => `${item.label} ${item.to}`)

describe('navigationFor', () => {
  it('instructor', () => {
    expect(routes('instructor')).toEqual([
      'Overview /', 'Courses /courses', 'Library /library', 'Review /review', 'Class results /results', 'Substrate explorer /explorer', 'Outbox /outbox',
    ])
  })

  it('ta', () => {
    expect(routes('ta')).toEqual(['Overview /', 'My sections /sections', 'Review /review', 'Class results /results', 'Library /library', 'Substrate explorer /explorer'])
  })

  it('coordinator', () => {
    expect(routes('coordinator')).toEqual(['Overview /', 'Schedule /schedule', 'Stockroom /stockroom', 'Library /library', 'Outbox /outbox'])
  })

  it('student', () => {
    expect(routes('student')).toEqual(['My lab /', 'Substrate explorer /explorer'])
  })

  it('adds the demo mailbox for instructors and coordinators only, and only in demo mode', () => {
    expect(routes('instructor', true).at(-1)).toBe('Demo mailbox /mailbox')
    expect(routes('coordinator', true).at(-1)).toBe('Demo mailbox /mailbox')
    expect(routes('ta', true)).not.toContain('Demo mailbox /mailbox')
    expect(routes('student', true)).not.toContain('Demo mailbox /mailbox')
    expect(routes('instructor')).not.toContain('Demo mailbox /mailbox')
  })

  it('gives nothing to a missing or unknown role', () => {
    expect(navigationFor(null)).toEqual([])
    expect(navigationFor('admin')).toEqual([])
    expect(navigationFor('constructor')).toEqual([])
  })

  it('keeps students away from staff pages', () => {
    const studentPaths = navigationFor('student').map((item) => item.to)
    for (const path of ['/review', '/courses', '/stockroom', '/outbox', '/sections', '/schedule']) {
      expect(studentPaths).not.toContain(path)
    }
  })
})

describe('isNavActive', () => {
  it('marks Overview only on the home page and others on their subpages too', () => {
    expect(isNavActive({ to: '/' }, '/')).toBe(true)
    expect(isNavActive({ to: '/' }, '/courses')).toBe(false)
    expect(isNavActive({ to: '/courses' }, '/courses/12/sections')).toBe(true)
    expect(isNavActive({ to: '/courses' }, '/coursesx')).toBe(false)
  })
})
