import { describe, expect, it } from 'vitest'
import {
  checkRosterRows, mapRosterRecords, parseRosterCsv, rosterCapacityConflicts, rosterMappingProblems,
  RosterFileError, suggestRosterMapping, summarizeRosterRows, type RosterAccount,
} from '../../shared/utils/roster-csv'

const SECTIONS = [{ id: 1, code: 'M1' }, { id: 2, code: 'T1' }]

function check(text: string, accounts = new Map<string, RosterAccount>(), studentIds = new Map<string, number>()) {
  const parsed = parseRosterCsv(text)
  return checkRosterRows(mapRosterRecords(parsed, suggestRosterMapping(parsed.columns)), { sections: SECTIONS, accounts, studentIds })
}

describe('parseRosterCsv', () => {
  it('reads comma, semicolon and tab files alike, with or without a byte-order mark', () => {
    const expected = { columns: ['Email', 'Name', 'Section'], cells: ['a@x.example', 'Ada Quill', 'M1'] }
    for (const [text, delimiter] of [
      ['\uFEFFEmail,Name,Section\r\na@x.example,Ada Quill,M1\r\n', ','],
      ['Email;Name;Section\na@x.example;Ada Quill;M1\n', ';'],
      ['Email\tName\tSection\na@x.example\tAda Quill\tM1', '\t'],
    ] as const) {
      const parsed = parseRosterCsv(text)
      expect(parsed.delimiter).toBe(delimiter)
      expect(parsed.columns).toEqual(expected.columns)
      expect(parsed.records).toEqual([{ row: 2, cells: expected.cells }])
    }
  })

  it('numbers rows as a spreadsheet does and skips blank lines without renumbering the rest', () => {
    const parsed = parseRosterCsv('Email,Name,Section\n\na@x.example,A,M1\n,,\nb@x.example,"B, second",T1\n')
    expect(parsed.records.map((r) => r.row)).toEqual([3, 5])
    expect(parsed.records[1]!.cells[1]).toBe('B, second')
  })

  it('names empty and repeated headers so every column can be chosen', () => {
    expect(parseRosterCsv('Name,,Name\nx,y,z').columns).toEqual(['Name', 'Column 2', 'Name (2)'])
  })

  it('refuses a file with no students, and an unclosed quote, with a sentence', () => {
    expect(() => parseRosterCsv('Email,Name,Section\n\n')).toThrow(RosterFileError)
    expect(() => parseRosterCsv('   ')).toThrow('no header')
    expect(() => parseRosterCsv('Email,Name\na@x.example,"Ada')).toThrow(/quoted cell/)
  })
})

describe('suggestRosterMapping', () => {
  it('recognises the usual spellings of each header', () => {
    expect(suggestRosterMapping(['E-mail Address', 'Full Name', 'Lab Section'])).toEqual({
      email: 'E-mail Address', name: 'Full Name', firstName: null, lastName: null, section: 'Lab Section', studentId: null,
    })
    expect(suggestRosterMapping(['Student ID', 'Given name', 'Surname', 'Campus e-mail', 'Sec'])).toEqual({
      email: 'Campus e-mail', name: null, firstName: 'Given name', lastName: 'Surname', section: 'Sec', studentId: 'Student ID',
    })
    expect(suggestRosterMapping(['Student number', 'Name', 'Email', 'Section']).studentId).toBe('Student number')
  })

  it('leaves a field unmapped rather than guessing from an unrelated header', () => {
    const mapping = suggestRosterMapping(['ID', 'Notes'])
    expect(Object.values(mapping).every((v) => v === null)).toBe(true)
    expect(rosterMappingProblems(mapping, ['ID', 'Notes']).map((p) => p.field)).toEqual(['email', 'name', 'section'])
  })

  it('names a mapped column the file does not have', () => {
    const problems = rosterMappingProblems({ email: 'Mail', name: 'Name', firstName: null, lastName: null, section: 'Gone', studentId: null }, ['Mail', 'Name'])
    expect(problems).toEqual([{ field: 'section', message: 'The file has no column “Gone”' }])
  })
})

describe('checkRosterRows', () => {
  it('builds a name from first and last name when there is no full-name column', () => {
    const [row] = check('First name,Last name,Email,Section\nAda,Quill,ADA@X.example,m1\n')
    expect(row).toMatchObject({ name: 'Ada Quill', email: 'ada@x.example', sectionCode: 'M1', sectionId: 1, outcome: 'new' })
  })

  it('names every problem of every bad row', () => {
    const rows = check([
      'Email,Name,Section',
      'good@x.example,Good One,M1',
      'not-an-address,Bad Mail,M1',
      'good@x.example,Twice,T1',
      'noname@x.example,,M1',
      'nosection@x.example,No Section,Z9',
      ',,',
      ',Only Name,',
    ].join('\n'))
    expect(rows.map((r) => [r.row, r.outcome])).toEqual([[2, 'new'], [3, 'error'], [4, 'error'], [5, 'error'], [6, 'error'], [8, 'error']])
    expect(rows[1]!.errors).toEqual([{ field: 'email', message: 'Not an e-mail address' }])
    expect(rows[2]!.errors).toEqual([{ field: 'email', message: 'Same e-mail as row 2' }])
    expect(rows[3]!.errors).toEqual([{ field: 'name', message: 'No name' }])
    expect(rows[4]!.errors).toEqual([{ field: 'section', message: 'No section “Z9” in this course' }])
    expect(rows[5]!.errors.map((e) => e.field)).toEqual(['email', 'section'])
    expect(summarizeRosterRows(rows)).toEqual({ new: 1, enrol: 0, move: 0, unchanged: 0, errors: 5, idsAdded: 0, idsChanged: 0 })
  })

  it('tells new accounts, enrolments, moves and students already in place apart', () => {
    const accounts = new Map<string, RosterAccount>([
      ['here@x.example', { userId: 10, role: 'student', activeSectionId: 1 }],
      ['mover@x.example', { userId: 11, role: 'student', activeSectionId: 2 }],
      ['other@x.example', { userId: 12, role: 'student', activeSectionId: null }],
      ['staff@x.example', { userId: 13, role: 'ta', activeSectionId: null }],
    ])
    const rows = check('Email,Name,Section\nhere@x.example,H,M1\nmover@x.example,M,M1\nother@x.example,O,M1\nfresh@x.example,F,M1\nstaff@x.example,S,M1\n', accounts)
    expect(rows.map((r) => r.outcome)).toEqual(['unchanged', 'move', 'enrol', 'new', 'error'])
    expect(rows[1]!.fromSectionCode).toBe('T1')
    expect(rows[4]!.errors[0]!.message).toMatch(/staff account/)
  })

  it('keeps the student id and refuses one used twice in the file or held by another student of the course', () => {
    const rows = check([
      'Student ID,Email,Name,Section',
      'LS1001,a@x.example,A,M1',
      'LS1001,b@x.example,B,M1',
      'LS2002,c@x.example,C,M1',
      'LS3003,here@x.example,H,M1',
      ',d@x.example,D,T1',
      `${'9'.repeat(41)},e@x.example,E,T1`,
    ].join('\n'), new Map([['here@x.example', { userId: 10, role: 'student', activeSectionId: 1 }]]),
    new Map([['LS2002', 10], ['LS3003', 10]]))
    expect(rows.map((r) => [r.studentId, r.outcome])).toEqual([
      ['LS1001', 'new'], ['LS1001', 'error'], ['LS2002', 'error'], ['LS3003', 'unchanged'], ['', 'new'], ['9'.repeat(41), 'error'],
    ])
    expect(rows[1]!.errors).toEqual([{ field: 'studentId', message: 'Same student ID as row 2' }])
    expect(rows[2]!.errors).toEqual([{ field: 'studentId', message: 'Another student in this course has this student ID' }])
    expect(rows[5]!.errors).toEqual([{ field: 'studentId', message: 'Student ID longer than 40 characters' }])
  })

  it('marks an id for a student already in the course as added where they had none, changed where it differs', () => {
    const accounts = new Map<string, RosterAccount>([
      ['none@x.example', { userId: 20, role: 'student', activeSectionId: 1, activeStudentId: null }],
      ['same@x.example', { userId: 21, role: 'student', activeSectionId: 1, activeStudentId: 'LS21' }],
      ['other@x.example', { userId: 22, role: 'student', activeSectionId: 1, activeStudentId: 'LS22' }],
      ['blank@x.example', { userId: 23, role: 'student', activeSectionId: 1, activeStudentId: 'LS23' }],
      ['moves@x.example', { userId: 24, role: 'student', activeSectionId: 1, activeStudentId: null }],
    ])
    const rows = check([
      'Student ID,Email,Name,Section',
      'LS20,none@x.example,N,M1', 'LS21,same@x.example,S,M1', 'LS99,other@x.example,O,M1', ',blank@x.example,B,M1',
      'LS24,moves@x.example,V,T1',
    ].join('\n'), accounts, new Map([['LS21', 21], ['LS22', 22], ['LS23', 23]]))
    expect(rows.map((r) => [r.outcome, r.studentIdChange, r.previousStudentId])).toEqual([
      ['unchanged', 'added', undefined], ['unchanged', undefined, undefined], ['unchanged', 'changed', 'LS22'],
      ['unchanged', undefined, undefined], ['move', 'added', undefined],
    ])
    expect(summarizeRosterRows(rows)).toMatchObject({ unchanged: 4, move: 1, idsAdded: 2, idsChanged: 1 })
  })

  it('keeps a formula-looking cell exactly as written', () => {
    const [row] = check('Email,Name,Section\nf@x.example,"=HYPERLINK(""http://x.example"",""y"")",M1\n')
    expect(row!.name).toBe('=HYPERLINK("http://x.example","y")')
    expect(row!.outcome).toBe('new')
  })
})

describe('rosterCapacityConflicts', () => {
  const sections = [
    { id: 1, code: 'M1', hoodStations: 2, studentsPerStation: 2, enrolled: 3 },
    { id: 2, code: 'T1', hoodStations: 1, studentsPerStation: 2, enrolled: 3 },
  ]
  const row = (sectionId: number, outcome: 'new' | 'move' | 'unchanged', fromSectionCode?: string) =>
    ({ row: 2, email: 'a@x.example', name: 'A', sectionCode: '', studentId: '', errors: [], userId: null, sectionId, outcome, fromSectionCode })

  it('flags a section the import fills past stations × students per station', () => {
    // 2 stations × 2 = 4 places; 3 + 2 new = 5.
    const conflicts = rosterCapacityConflicts(sections, [row(1, 'new'), row(1, 'new')])
    expect(conflicts).toHaveLength(1)
    expect(conflicts[0]!.sectionIds).toEqual([1])
    expect(conflicts[0]!.message).toContain('M1 has 5 students')
  })

  it('counts a move out of a section and ignores sections the import does not add to', () => {
    // T1 is already over (3 > 2) but the import only takes a student out of it; M1 ends at 4.
    expect(rosterCapacityConflicts(sections, [row(1, 'move', 'T1'), row(1, 'unchanged')])).toEqual([])
  })
})
