import { ChemistryInputError } from '#shared/utils/halogenation'

/** Engine input errors are the caller's mistake: 400 with the engine's own sentence. */
export function asBadRequest<T>(work: () => T): T {
  try {
    return work()
  } catch (error) {
    if (error instanceof ChemistryInputError) {
      throw createError({ statusCode: 400, statusMessage: error.message, data: { code: error.code } })
    }
    throw error
  }
}
