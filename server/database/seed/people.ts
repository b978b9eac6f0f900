import type { Kysely } from 'kysely'
import type { Database, Role } from '../schema'

// Invented people for the fictional Larkspur State University demo.
export const DEMO_DOMAIN = 'larkspur.example'
export const DEMO_PASSWORD = 'halocline-demo'

const STAFF: Array<{ local: string, name: string, role: Role }> = [
  { local: 'instructor', name: 'Ines Harrowgate', role: 'instructor' },
  { local: 'ta1', name: 'Tobias Wrenfield', role: 'ta' },
  { local: 'ta2', name: 'Priya Callowmere', role: 'ta' },
  { local: 'coordinator', name: 'Dmitri Ashgrove', role: 'coordinator' },
]

const FIRST = [
  'Amara', 'Bastian', 'Celeste', 'Dario', 'Elif', 'Finnian', 'Greta', 'Hollis',
  'Ilse', 'Jovan', 'Kenji', 'Lucia', 'Mateo', 'Noor', 'Oskar', 'Paloma',
  'Quentin', 'Rosalind', 'Soren', 'Talia', 'Umar', 'Vesna', 'Wilhelmina', 'Xavi',
  'Yara', 'Zeno', 'Anouk', 'Bram', 'Calla', 'Desmond', 'Esme', 'Florin',
]
const LAST = [
  'Abernath', 'Brightwater', 'Castellane', 'Dunmore', 'Eskerby', 'Fairholme', 'Galloway', 'Hazelrig',
  'Ivers', 'Jessop', 'Kilbride', 'Lindqvist', 'Marchetti', 'Northcote', 'Okonkwo', 'Pellegrin',
  'Quarrie', 'Rushworth', 'Stavros', 'Thornbury', 'Underhill', 'Varga', 'Whitlow', 'Yardley',
  'Zielinski', 'Ashcombe', 'Belvedere', 'Crane', 'Dovecote', 'Ellery', 'Fenwick', 'Greaves',
]

export interface DemoPerson {
  email: string
  name: string
  role: Role
}

export function demoPeople(): DemoPerson[] {
  const staff = STAFF.map((s) => ({ email: `${s.local}@${DEMO_DOMAIN}`, name: s.name, role: s.role }))
  const students = Array.from({ length: 64 }, (_, i) => ({
    email: `student${String(i + 1).padStart(2, '0')}@${DEMO_DOMAIN}`,
    // Stride through the surname list so neighbours on the roster do not share initials; the
    // second pass through the first names is shifted, so no two students share a full name.
    name: `${FIRST[i % FIRST.length]} ${LAST[(i * 7 + 3 + Math.floor(i / FIRST.length) * 11) % LAST.length]}`,
    role: 'student' as const,
  }))
  return [...staff, ...students]
}

/** Inserts the demo people (from `demoPeople()`, each with its password hash); returns their ids by e-mail. */
export async function seedPeople(db: Kysely<Database>, people: Array<DemoPerson & { passwordHash: string }>): Promise<Map<string, number>> {
  const rows = await db
    .insertInto('users')
    .values(people)
    .returning(['id', 'email'])
    .execute()
  return new Map(rows.map((r) => [r.email, r.id]))
}
