export default defineEventHandler(async (event) => {
  requireRole(event, 'instructor', 'coordinator')
  return listMailbox(requireDemoMailbox())
})
