import type { MyLab } from '#shared/types/section'
import { studentLab } from '~~/server/services/sections'

// A student's own lab: section, station, partner, meetings and practicals. Nothing about others
// beyond their partner's name.
export default defineEventHandler(async (event): Promise<MyLab> => {
  const me = requireRole(event, 'student')
  return studentLab(me.id)
})
