import type { H3Event } from 'h3'

/**
 * Sends JSON that is already written (by an engine worker, or remembered) as it is, with its
 * content type. Typed as what the text holds, so the route's answer type (typed fetch, the test
 * client) stays the object's.
 */
export function sendJsonText<T>(event: H3Event, text: string | Uint8Array): T {
  setResponseHeader(event, 'content-type', 'application/json')
  return text as unknown as T
}
