// Teaching assistants an instructor can put on a section.
export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor')
  return useDb().selectFrom('users').select(['id', 'name', 'email'])
    .where('role', '=', 'ta').where('disabledAt', 'is', null).orderBy('name').execute()
})
