// Roster files: reading a CSV, suggesting which column feeds which field, and checking every
// row against the course before anything is written. Pure: the server loads the course's
// sections and accounts and hands them in; the page shows the same answers.
import Papa from 'papaparse'
import { z } from 'zod'
import { findConflicts } from './schedule'
import { messageExcerpt, textInputProblem } from './text-input'
import type { RosterField, RosterMapping, RosterPreviewRow, RosterRowIssue, RosterSummary } from '../types/roster'

export const MAX_ROSTER_ROWS = 2000
export const MAX_NAME_LENGTH = 120
export const MAX_STUDENT_ID_LENGTH = 40

export class RosterFileError extends Error {}

export interface RosterRecord {
  /** Spreadsheet row number: the header is row 1. */
  row: number
  cells: string[]
}

export interface ParsedRoster {
  columns: string[]
  records: RosterRecord[]
  delimiter: string
}

const blank = (cells: string[]) => cells.every((c) => c.trim() === '')

/** Comma, semicolon or tab separated, with or without a byte-order mark; blank rows skipped. */
export function parseRosterCsv(text: string): ParsedRoster {
  const result = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), {
    delimitersToGuess: [',', ';', '\t'],
    skipEmptyLines: false,
  })
  const quote = result.errors.find((e) => e.type === 'Quotes')
  if (quote) throw new RosterFileError(`Row ${(quote.row ?? 0) + 1}: a quoted cell is never closed`)
  const headerIndex = result.data.findIndex((cells) => !blank(cells))
  if (headerIndex < 0) throw new RosterFileError('The file has no header row')
  const seen = new Map<string, number>()
  const columns = result.data[headerIndex]!.map((raw, i) => {
    const name = raw.trim() || `Column ${i + 1}`
    const count = (seen.get(name) ?? 0) + 1
    seen.set(name, count)
    return count > 1 ? `${name} (${count})` : name
  })
  const records: RosterRecord[] = []
  result.data.forEach((cells, index) => {
    if (index > headerIndex && !blank(cells)) records.push({ row: index + 1, cells })
  })
  if (!records.length) throw new RosterFileError('The file has a header but no students')
  if (records.length > MAX_ROSTER_ROWS) throw new RosterFileError(`At most ${MAX_ROSTER_ROWS} students in one file`)
  return { columns, records, delimiter: result.meta.delimiter }
}

// Header spellings seen in exports from registrars and spreadsheets (common practice).
const ALIASES: Record<RosterField, string[]> = {
  email: ['email', 'emailaddress', 'mail', 'studentemail', 'universityemail', 'campusemail', 'schoolemail'],
  name: ['name', 'fullname', 'studentname', 'student', 'displayname'],
  firstName: ['firstname', 'givenname', 'givennames', 'first', 'forename'],
  lastName: ['lastname', 'surname', 'familyname', 'last'],
  section: ['section', 'sectioncode', 'sec', 'lab', 'labsection', 'labgroup', 'group'],
  studentId: ['studentid', 'studentnumber', 'studentno', 'sid', 'idnumber', 'universityid', 'registrarid', 'matriculationnumber'],
}
const FALLBACK: Partial<Record<RosterField, RegExp>> = { email: /mail/, section: /section/, studentId: /student(id|number|no)/ }

const headerKey = (header: string) => header.toLowerCase().replace(/[^a-z0-9]/g, '')

/** Which column feeds which field, judged by the header alone; each column used once. */
export function suggestRosterMapping(columns: string[]): RosterMapping {
  const mapping: RosterMapping = { email: null, name: null, firstName: null, lastName: null, section: null, studentId: null }
  const used = new Set<string>()
  const take = (field: RosterField, test: (key: string) => boolean) => {
    if (mapping[field]) return
    const column = columns.find((c) => !used.has(c) && test(headerKey(c)))
    if (column) { mapping[field] = column; used.add(column) }
  }
  for (const field of Object.keys(ALIASES) as RosterField[]) take(field, (key) => ALIASES[field].includes(key))
  for (const [field, pattern] of Object.entries(FALLBACK) as Array<[RosterField, RegExp]>) take(field, (key) => pattern.test(key))
  return mapping
}

/** What is wrong with a mapping itself, field by field (an e-mail, a name and a section are needed). */
export function rosterMappingProblems(mapping: RosterMapping, columns: string[]): Array<{ field: RosterField, message: string }> {
  const problems: Array<{ field: RosterField, message: string }> = []
  for (const [field, column] of Object.entries(mapping) as Array<[RosterField, string | null]>) {
    if (column && !columns.includes(column)) problems.push({ field, message: `The file has no column “${messageExcerpt(column, 60)}”` })
  }
  if (!mapping.email) problems.push({ field: 'email', message: 'Choose the column with the e-mail addresses' })
  if (!mapping.name && !mapping.firstName && !mapping.lastName) {
    problems.push({ field: 'name', message: 'Choose the column with the names (or first and last name)' })
  }
  if (!mapping.section) problems.push({ field: 'section', message: 'Choose the column with the section codes' })
  return problems
}

export interface MappedRosterRow {
  row: number
  email: string
  name: string
  sectionCode: string
  studentId: string
}

/** Cells are trimmed and otherwise kept exactly as written: a cell that looks like a formula stays text. */
export function mapRosterRecords(parsed: ParsedRoster, mapping: RosterMapping): MappedRosterRow[] {
  const index = (field: RosterField) => (mapping[field] ? parsed.columns.indexOf(mapping[field]!) : -1)
  const at = (cells: string[], i: number) => (i >= 0 ? (cells[i] ?? '').trim() : '')
  const [email, name, first, last, section, studentId] = (['email', 'name', 'firstName', 'lastName', 'section', 'studentId'] as const)
    .map(index) as number[]
  return parsed.records.map(({ row, cells }) => ({
    row,
    email: at(cells, email!).toLowerCase(),
    name: at(cells, name!) || [at(cells, first!), at(cells, last!)].filter(Boolean).join(' '),
    sectionCode: at(cells, section!),
    studentId: at(cells, studentId!),
  }))
}

export interface RosterAccount {
  userId: number
  role: string
  /** The section of this course the student is active in, if any. */
  activeSectionId: number | null
  /** The student id on that active enrolment, if any. */
  activeStudentId?: string | null
}

export interface RosterCheckContext {
  sections: Array<{ id: number, code: string }>
  /** Existing accounts by (lower-case) e-mail. */
  accounts: Map<string, RosterAccount>
  /** Student ids already held in this course's active enrolments → the account holding each. */
  studentIds: Map<string, number>
}

export interface CheckedRosterRow extends RosterPreviewRow {
  sectionId: number | null
  userId: number | null
}

const emailSchema = z.email().max(254)
const sectionKey = (code: string) => code.trim().toLowerCase()

/** Every row's outcome, or every reason it cannot be imported. */
export function checkRosterRows(rows: MappedRosterRow[], context: RosterCheckContext): CheckedRosterRow[] {
  const sections = new Map(context.sections.map((s) => [sectionKey(s.code), s]))
  const codes = new Map(context.sections.map((s) => [s.id, s.code]))
  const firstRowOf = new Map<string, number>()
  const firstRowOfId = new Map<string, number>()
  return rows.map((r) => {
    const errors: RosterRowIssue[] = []
    // A cell becomes an account's e-mail or name: one line, no control characters.
    const unfit = (['email', 'name', 'section', 'studentId'] as const).flatMap((field) => {
      const problem = textInputProblem(field === 'section' ? r.sectionCode : r[field], { singleLine: true })
      return problem ? [{ field, message: problem }] : []
    })
    if (unfit.length) return { ...r, outcome: 'error' as const, errors: unfit, sectionId: null, userId: null }
    if (!r.email) errors.push({ field: 'email', message: 'No e-mail address' })
    else if (!emailSchema.safeParse(r.email).success) errors.push({ field: 'email', message: 'Not an e-mail address' })
    else if (firstRowOf.has(r.email)) errors.push({ field: 'email', message: `Same e-mail as row ${firstRowOf.get(r.email)}` })
    else firstRowOf.set(r.email, r.row)
    if (!r.name) errors.push({ field: 'name', message: 'No name' })
    else if (r.name.length > MAX_NAME_LENGTH) errors.push({ field: 'name', message: `Name longer than ${MAX_NAME_LENGTH} characters` })
    const section = r.sectionCode ? sections.get(sectionKey(r.sectionCode)) : undefined
    if (!r.sectionCode) errors.push({ field: 'section', message: 'No section code' })
    else if (!section) errors.push({ field: 'section', message: `No section “${messageExcerpt(r.sectionCode)}” in this course` })
    const account = r.email ? context.accounts.get(r.email) : undefined
    if (account && account.role !== 'student') {
      errors.push({ field: 'email', message: 'This e-mail belongs to a staff account, not a student' })
    }
    errors.push(...studentIdProblems(r, account?.userId ?? null, context.studentIds, firstRowOfId))

    const base = {
      ...r,
      sectionCode: section?.code ?? r.sectionCode,
      errors,
      sectionId: section?.id ?? null,
      userId: account?.userId ?? null,
    }
    if (errors.length) return { ...base, outcome: 'error' as const }
    if (!account) return { ...base, outcome: 'new' as const }
    if (account.activeSectionId === null) return { ...base, outcome: 'enrol' as const }
    const placed = { ...base, ...studentIdChange(r.studentId, account.activeStudentId ?? null) }
    if (account.activeSectionId === section!.id) return { ...placed, outcome: 'unchanged' as const }
    return { ...placed, outcome: 'move' as const, fromSectionCode: codes.get(account.activeSectionId) ?? '' }
  })
}

/** What the file's id does to a student already in the course; an empty cell never erases one. */
function studentIdChange(given: string, held: string | null): Pick<RosterPreviewRow, 'studentIdChange' | 'previousStudentId'> {
  if (!given || given === held) return {}
  return held === null ? { studentIdChange: 'added' } : { studentIdChange: 'changed', previousStudentId: held }
}

/** The optional student id: short, once in the file, and not another student's in this course. */
function studentIdProblems(r: MappedRosterRow, userId: number | null, held: Map<string, number>, firstRowOf: Map<string, number>) {
  if (!r.studentId) return []
  if (r.studentId.length > MAX_STUDENT_ID_LENGTH) {
    return [{ field: 'studentId' as const, message: `Student ID longer than ${MAX_STUDENT_ID_LENGTH} characters` }]
  }
  const first = firstRowOf.get(r.studentId)
  if (first !== undefined) return [{ field: 'studentId' as const, message: `Same student ID as row ${first}` }]
  firstRowOf.set(r.studentId, r.row)
  const holder = held.get(r.studentId)
  if (holder !== undefined && holder !== userId) {
    return [{ field: 'studentId' as const, message: 'Another student in this course has this student ID' }]
  }
  return []
}

export function summarizeRosterRows(rows: Array<Pick<RosterPreviewRow, 'outcome' | 'studentIdChange'>>): RosterSummary {
  const summary: RosterSummary = { new: 0, enrol: 0, move: 0, unchanged: 0, errors: 0, idsAdded: 0, idsChanged: 0 }
  for (const r of rows) {
    if (r.outcome === 'error') summary.errors++
    else summary[r.outcome]++
    if (r.studentIdChange === 'added') summary.idsAdded++
    else if (r.studentIdChange === 'changed') summary.idsChanged++
  }
  return summary
}

export interface RosterCapacitySection {
  id: number
  code: string
  hoodStations: number
  studentsPerStation: number
  /** Active students now. */
  enrolled: number
}

/** Sections the import would fill past hood stations × students per station (only those it adds to). */
export function rosterCapacityConflicts(sections: RosterCapacitySection[], rows: CheckedRosterRow[]) {
  const before = new Map(sections.map((s) => [s.id, s.enrolled]))
  const after = new Map(before)
  const fromId = new Map(sections.map((s) => [s.code, s.id]))
  for (const r of rows) {
    if (r.outcome === 'error' || r.outcome === 'unchanged' || r.sectionId === null) continue
    after.set(r.sectionId, (after.get(r.sectionId) ?? 0) + 1)
    const from = r.outcome === 'move' ? fromId.get(r.fromSectionCode ?? '') : undefined
    if (from !== undefined) after.set(from, (after.get(from) ?? 0) - 1)
  }
  // The same capacity rule as the schedule's conflict check; no meetings, so only capacity applies.
  return findConflicts(sections.map((s) => ({
    sectionId: s.id, label: s.code, room: `section-${s.id}`, taIds: [], meetings: [],
    enrolled: after.get(s.id) ?? 0, hoodStations: s.hoodStations, studentsPerStation: s.studentsPerStation,
  }))).filter((c) => c.kind === 'capacity' && c.sectionIds.some((id) => (after.get(id) ?? 0) > (before.get(id) ?? 0)))
    .map((c) => ({ kind: 'capacity' as const, sectionIds: c.sectionIds, message: c.message }))
}

export interface RosterRequestProblem {
  status: number | null
  /** One sentence for people, without the field prefix the server puts in front. */
  message: string
  /** Per-field sentences from `data.issues`, keyed by field. */
  fields: Record<string, string>
  data: Record<string, unknown>
}

/** What a failed `$fetch` to the roster routes said, shaped for forms (see pages/account.vue). */
export function rosterRequestProblem(error: unknown, fallback = 'That did not work. Please try again.'): RosterRequestProblem {
  const e = error as { statusCode?: number, data?: { statusMessage?: string, message?: string, data?: Record<string, unknown> } }
  const status = e?.statusCode ?? null
  const data = e?.data?.data ?? {}
  const fields: Record<string, string> = {}
  for (const issue of (data.issues as Array<{ field?: string, message?: string }> | undefined) ?? []) {
    if (issue.field && issue.message && !fields[issue.field]) fields[issue.field] = issue.message
  }
  const raw = status === null || status >= 500 ? fallback : (e?.data?.statusMessage || e?.data?.message || fallback)
  const message = raw.replace(/^[\w.]+: /, '')
  return { status, message: /[.!?]$/.test(message) ? message : `${message}.`, fields, data }
}
