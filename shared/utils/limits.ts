// Limits the browser and the server both apply: the page checks them before sending, so a file
// the server would refuse is not uploaded at all; the server checks again.

/** Largest upload, in bytes ("2 MB" as the peak-table parser counts it, so all refuse alike). */
export const MAX_UPLOAD_BYTES = 2_000_000

/** The limit in words, for messages. */
export const MAX_UPLOAD_WORDS = '2 MB'
