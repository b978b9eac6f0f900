import { forecastQuerySchema, type ForecastAnswer } from '#shared/types/stockroom'
import { forecastJson, requireStockroomReader } from '../../services/stockroom'

// What the schedule will use in a date range, against the stock that will still be in date.
// Coordinators see every course; instructors their own (the scope is in the loader's where).
export default defineEventHandler(async (event): Promise<ForecastAnswer> => {
  const me = requireStockroomReader(event)
  const query = readQueryAs(event, forecastQuerySchema)
  return sendJsonBytes<ForecastAnswer>(event, await forecastJson(useDb(), me, query))
})
