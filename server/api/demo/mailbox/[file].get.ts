import { z } from 'zod'

const paramsSchema = z.object({ file: z.string().min(1).max(200) })

export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { file } = readParamsAs(event, paramsSchema)
  return readMailboxFile(me, requireDemoMailbox(), file)
})
