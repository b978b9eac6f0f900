// The coordinator's overview. Later features add their counts here; for now it proves the role gate.
export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'coordinator')
  return { role: me.role, name: me.name, cards: [] as Array<{ title: string, value: string, to?: string }> }
})
