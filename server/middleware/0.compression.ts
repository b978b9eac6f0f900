import { ServerResponse } from 'node:http'
import { constants } from 'node:zlib'
import compression from 'compression'
import type { NodeMiddleware } from 'h3'

// Dynamic answers (pages, JSON, CSV, calendar feeds) are compressed on the way out when the
// request accepts br or gzip; the hashed build files are compressed once at build time
// (`compressPublicAssets` in nuxt.config.ts) and served by Nitro before this runs. The
// middleware (expressjs/compression) wraps the response stream, so downloads stream as before,
// and it leaves alone: bodies under 1 kB, types that do not shrink (images, workbooks, netCDF),
// answers already encoded, `Cache-Control: no-transform`, HEAD. It adds `Vary: Accept-Encoding`.
// Brotli quality 4: about as fast as gzip's default and smaller; quality 11 costs a hundred
// times the CPU for a few per cent (`npm run bench -- delivery` prints both per kind).
// Its types speak of Express's request and response; it uses only node's own.
const compress = fromNodeMiddleware(compression({
  threshold: 1024,
  brotli: { params: { [constants.BROTLI_PARAM_QUALITY]: 4 } },
}) as unknown as NodeMiddleware)

// Only what goes on the wire: Nitro's in-process fetches (the error page that Nuxt renders
// through one, SSR data) run on stand-in responses, and a compressed body there came back empty
// with its Content-Encoding copied onto the real answer.
export default defineEventHandler(async (event) => {
  const res = event.node.res
  if (!(res instanceof ServerResponse)) return
  await compress(event)
  stateLengthOnEnd(res)
})

type End = ServerResponse['end']
// Answers that carry no body, whatever end() is given.
const BODILESS = new Set([204, 304])

// h3 sends a whole answer with one res.end(body) and no Content-Length. Node works a length out
// itself only when end() comes before the headers are written, and compression writes them
// first (to choose whether to compress), so every answer went out chunked, in four pieces.
// Stating the length here, before compression looks, keeps a plain answer in one piece with its
// Content-Length; when compression does compress, it removes the header itself.
function stateLengthOnEnd(res: ServerResponse) {
  const compressedEnd = res.end as (...args: unknown[]) => ServerResponse
  res.end = function end(this: ServerResponse, ...args: [{ length?: number } | undefined, ...unknown[]]) {
    const [chunk, encoding] = args
    if (!this.headersSent && !this.hasHeader('content-length') && !BODILESS.has(this.statusCode) && chunk?.length) {
      if (typeof chunk === 'string') {
        this.setHeader('content-length', Buffer.byteLength(chunk, typeof encoding === 'string' ? encoding as BufferEncoding : 'utf8'))
      } else if (chunk instanceof Uint8Array) {
        this.setHeader('content-length', chunk.byteLength)
      }
    }
    return compressedEnd.apply(this, args)
  } as End
}
