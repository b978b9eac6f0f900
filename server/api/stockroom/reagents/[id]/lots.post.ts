import { idParamsSchema } from '#shared/types/fields'
import { lotInputSchema, type LotView } from '#shared/types/stockroom'
import { addLot, requireStockroomManager } from '../../../../services/stockroom'

// Stock that arrives outside an order sheet (a stocktake, a transfer).
export default defineEventHandler(async (event): Promise<LotView> => {
  requireStockroomManager(event)
  const { id } = readParamsAs(event, idParamsSchema)
  const input = await readBodyAs(event, lotInputSchema)
  const lot = await addLot(useDb(), actorOf(event), id, input)
  setResponseStatus(event, 201)
  return lot
})
