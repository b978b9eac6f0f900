// The people the local identity provider knows: the demo scenario's staff and students (the same
// invented registrar ids as server/database/seed/course.ts), plus a visitor who has a campus account
// but no place in any course, so the demo and the tests can show someone being turned away.
const DOMAIN = 'larkspur.example'

const STAFF = [
  { local: 'instructor', name: 'Instructor (demo)', campusId: 'LSF0001001' },
  { local: 'ta1', name: 'Teaching assistant 1 (demo)', campusId: 'LSF0002001' },
  { local: 'ta2', name: 'Teaching assistant 2 (demo)', campusId: 'LSF0002002' },
  { local: 'coordinator', name: 'Lab coordinator (demo)', campusId: 'LSF0003001' },
]

/** @returns {Array<{ email: string, name: string, campusId: string, emailVerified: boolean }>} */
export function campusPeople() {
  const staff = STAFF.map((s) => ({ email: `${s.local}@${DOMAIN}`, name: s.name, campusId: s.campusId, emailVerified: true }))
  const students = Array.from({ length: 64 }, (_, i) => {
    const n = i + 1
    return {
      email: `student${String(n).padStart(2, '0')}@${DOMAIN}`,
      name: `Student ${String(n).padStart(2, '0')} (demo)`,
      campusId: `LS${String(2640100 + n * 37).padStart(7, '0')}`,
      emailVerified: true,
    }
  })
  const visitor = { email: `visitor@${DOMAIN}`, name: 'Visitor (demo)', campusId: 'LS9990001', emailVerified: true }
  return [...staff, ...students, visitor]
}

/** The e-mail or campus id a person types at the local provider, any case. */
export function findCampusPerson(login) {
  const wanted = String(login ?? '').trim().toLowerCase()
  return campusPeople().find((p) => p.email === wanted || p.campusId.toLowerCase() === wanted)
}
