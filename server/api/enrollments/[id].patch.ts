import { idParamsSchema } from '#shared/types/fields'
import { enrollmentPatchSchema } from '#shared/types/roster'
import { placeEnrollment, refuseWithdrawn, requireEnrollmentAccess } from '~~/server/services/roster'

// Move a student to another section of the same course, or to a station and seat in theirs
// (swapping with whoever sits there). One transaction, one audit row with before and after.
export default defineEventHandler(async (event) => {
  requireUser(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const { enrollment, scope } = await requireEnrollmentAccess(event, id, 'manage')
  const input = await readBodyAs(event, enrollmentPatchSchema)
  refuseWithdrawn(enrollment)
  const moving = input.sectionId !== undefined && input.sectionId !== enrollment.sectionId
  const target = moving ? (await requireSectionAccess(event, input.sectionId!, 'manage')).section : scope.section
  return placeEnrollment(useDb(), actorOf(event), enrollment, target, input)
})
