import { idParamsSchema } from '#shared/types/fields'
import { rosterUploadFieldsSchema, type RosterImportResult } from '#shared/types/roster'
import { planRosterImport, refuseOverCapacity, withRosterRace, writeRosterRows } from '~~/server/services/roster'

// The whole file or nothing: accounts, enrolments, moves, invitations and their e-mails, the
// original file and the import record land in one transaction. Every row is checked again here.
export default defineEventHandler(async (event): Promise<RosterImportResult> => {
  const me = requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { course } = await requireCourseAccess(event, id, 'manage')
  const upload = await readUpload(event)
  const { confirmConflicts } = validate(rosterUploadFieldsSchema, upload.fields)

  const result = await withRosterRace(() => useDb().transaction().execute(async (trx) => {
    const plan = await planRosterImport(trx, course.id, upload)
    if (plan.mappingIssues.length) invalid(plan.mappingIssues, 422)
    const bad = plan.rows.filter((r) => r.outcome === 'error')
    if (bad.length) {
      const rows = bad.flatMap((r) => r.errors.map((e) => ({ row: r.row, field: e.field, message: e.message })))
      throw createError({ statusCode: 422, statusMessage: `Row ${rows[0]!.row}: ${rows[0]!.message}`, data: { rows } })
    }
    refuseOverCapacity(plan.conflicts, confirmConflicts === 'true')

    const { invited, moved } = await writeRosterRows(trx, { event, course, me }, plan.rows)
    const fileId = await storeFile(trx, upload.file, me.id, 'text/csv')
    const summary = plan.summary
    const row = await trx.insertInto('rosterImports').values({
      courseId: course.id, fileId, mapping: JSON.stringify(plan.mapping), summary: JSON.stringify(summary), createdBy: me.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, {
      action: 'roster.import', entity: 'course', entityId: course.id,
      after: { importId: row.id, fileId, fileName: upload.file.name, summary, invited, moved, conflictsConfirmed: plan.conflicts.map((c) => c.message) },
    })
    return { importId: row.id, summary }
  }), 'The roster changed while importing. Preview the file again.')
  setResponseStatus(event, 201)
  return result
})
