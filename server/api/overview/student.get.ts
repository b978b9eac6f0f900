import type { Overview } from '#shared/types/overview'

// The student's first screen is their lab (GET /api/me/lab); this stays for the role check.
export default defineEventHandler(async (event): Promise<Overview> => {
  const me = requireRole(event, 'student')
  return { role: me.role, name: me.name, cards: [] }
})
