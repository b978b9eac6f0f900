import { plural } from './words'
import type { RosterSummary } from '#shared/types/roster'

// What a roster import did, in one sentence: the toast after an import and the import history
// say it the same way. Only what happened is named ("3 student ids added"), never zeros.

/** "2 new accounts invited, 3 student ids added, 1 row skipped." */
export function describeRosterImport(s: RosterSummary, idsKept = 0): string {
  const parts: Array<[number, string]> = [
    [s.new, `${plural(s.new, 'new account')} invited`],
    [s.enrol, `${plural(s.enrol, 'existing account')} enrolled`],
    [s.move, `${s.move} moved`],
    [s.unchanged, `${s.unchanged} already there`],
    [s.idsAdded, `${plural(s.idsAdded, 'student id')} added`],
    [s.idsChanged, `${plural(s.idsChanged, 'student id')} replaced`],
    [idsKept, `${plural(idsKept, 'changed student id')} not applied`],
    [s.errors, `${plural(s.errors, 'row')} skipped`],
  ]
  const said = parts.filter(([n]) => n > 0).map(([, text]) => text)
  return said.length ? `${said.join(', ')}.` : 'Nothing to change.'
}

/** The import button: "Import 3 students, add 2 student ids, skip 1 row". */
export function rosterImportLabel(s: RosterSummary, replacing: number): string {
  const students = s.new + s.enrol + s.move
  const parts = [
    students ? `import ${plural(students, 'student')}` : '',
    s.idsAdded ? `add ${plural(s.idsAdded, 'student id')}` : '',
    replacing ? `replace ${plural(replacing, 'student id')}` : '',
    s.errors ? `skip ${plural(s.errors, 'row')}` : '',
  ].filter(Boolean)
  const text = parts.join(', ') || 'import'
  return text.charAt(0).toUpperCase() + text.slice(1)
}
