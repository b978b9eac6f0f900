export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  return listMailbox(me, requireDemoMailbox())
})
