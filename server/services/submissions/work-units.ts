// Whose result a submission is: one student ('user:<id>'), or everyone at one hood station of a
// section for pair work ('station:<section>:<station>'). Stored in submissions.unit_key; uploads,
// digests, the review queue and the demo seed all name units here. No Nitro, no database: the
// demo seed imports it too.

export type WorkUnitKind = 'student' | 'pair'

export const studentUnitKey = (userId: number) => `user:${userId}`
export const stationUnitKey = (sectionId: number, station: number) => `station:${sectionId}:${station}`

/** The unit a student's result counts for: their station's for pair work once they have one, else their own. */
export function unitKeyOf(workUnit: WorkUnitKind, student: { userId: number, sectionId: number, station: number | null }): string {
  return workUnit === 'pair' && student.station !== null
    ? stationUnitKey(student.sectionId, student.station)
    : studentUnitKey(student.userId)
}

const STATION_KEY = /^station:\d+:(\d+)$/

/** The hood station a unit key names, or null for a student's own unit. */
export function stationOfUnitKey(unitKey: string): number | null {
  const match = STATION_KEY.exec(unitKey)
  return match ? Number(match[1]) : null
}
