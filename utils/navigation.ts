import type { IconName } from '~/components/base/BaseIcon.vue'
import type { Role } from '~~/shared/types/auth'

export interface NavItem {
  label: string
  to: string
  icon: IconName
}

const overview: NavItem = { label: 'Overview', to: '/', icon: 'home' }
const review: NavItem = { label: 'Review', to: '/review', icon: 'review' }
const results: NavItem = { label: 'Class results', to: '/results', icon: 'chart' }
const explorer: NavItem = { label: 'Substrate explorer', to: '/explorer', icon: 'molecule' }
const library: NavItem = { label: 'Library', to: '/library', icon: 'molecule' }
const outbox: NavItem = { label: 'Outbox', to: '/outbox', icon: 'mail' }
const mailbox: NavItem = { label: 'Demo mailbox', to: '/mailbox', icon: 'mail' }

const byRole: Record<Role, NavItem[]> = {
  instructor: [overview, { label: 'Courses', to: '/courses', icon: 'list' }, library, review, results, explorer, outbox],
  ta: [overview, { label: 'My sections', to: '/sections', icon: 'calendar' }, review, results, library, explorer],
  coordinator: [
    overview,
    { label: 'Schedule', to: '/schedule', icon: 'calendar' },
    { label: 'Stockroom', to: '/stockroom', icon: 'box' },
    library,
    outbox,
  ],
  student: [{ label: 'My lab', to: '/', icon: 'flask' }, explorer],
}

// Only staff who send mail see what the local mail fake caught.
const seesDemoMailbox: Role[] = ['instructor', 'coordinator']

/**
 * The links a role sees in the app shell. Pure so it can be tested without a session;
 * callers pass `demo` from `useRuntimeConfig().public.demo`. Unknown roles get no links.
 */
export function navigationFor(role: Role | string | null | undefined, options: { demo?: boolean } = {}): NavItem[] {
  if (!role || !Object.hasOwn(byRole, role)) return []
  const items = [...byRole[role as Role]]
  if (options.demo && seesDemoMailbox.includes(role as Role)) items.push(mailbox)
  return items
}

/** A link is current on its own path and below it, except Overview, which is current only on "/". */
export function isNavActive(item: Pick<NavItem, 'to'>, path: string): boolean {
  if (item.to === '/') return path === '/'
  return path === item.to || path.startsWith(`${item.to}/`)
}

/** "Ada Quill" → "AQ"; used for the avatar circle beside the name. */
export function initialsOf(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean)
  const letters = parts.length > 1 ? [parts[0]![0], parts.at(-1)![0]] : [parts[0]?.[0], parts[0]?.[1]]
  return letters.filter(Boolean).join('').toUpperCase()
}
