import { z } from 'zod'
import { readMailboxFile, requireDemoMailbox } from '../../../services/outbox'

const paramsSchema = z.object({ file: z.string().min(1).max(200) })

export default defineEventHandler(async (event) => {
  const me = requireRole(event, 'instructor', 'coordinator')
  const { file } = readParamsAs(event, paramsSchema)
  return readMailboxFile(useDb(), me, requireDemoMailbox(useRuntimeConfig(event)), file)
})
