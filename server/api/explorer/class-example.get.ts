import { classExampleFor } from '../../services/results'

// The explorer's worked example: the caller's own class result (a practical's class median), or null.
export default defineEventHandler(async (event) => {
  const me = requireUser(event)
  return classExampleFor(me)
})
