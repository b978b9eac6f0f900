import type { H3Event } from 'h3'
import { requireRole } from '../../utils/auth'

// Who may use the stockroom. Coordinators manage all of it; instructors read the catalog and
// the forecast of their own courses; TAs and students have no business here (403 on every route).

export function requireStockroomManager(event: H3Event) {
  return requireRole(event, 'coordinator')
}

export function requireStockroomReader(event: H3Event) {
  return requireRole(event, 'coordinator', 'instructor')
}
