import { request } from 'node:http'
import { inject } from 'vitest'
import { replyOf, type Answer, type Reply } from './http'

/**
 * POSTs JSON from another loopback address (127.0.0.2, 127.0.0.3, …): Linux routes all of
 * 127/8 to the loopback device, so the server sees a client of its own. Per-address limits can
 * then be tested without spending the address every other test signs in from.
 */
export function postFrom<Path extends string>(localAddress: string, path: Path, json: unknown): Promise<Reply<Answer<Path, 'post'>>> {
  const url = new URL(path, inject('baseUrl'))
  const body = JSON.stringify(json)
  return new Promise((resolve, reject) => {
    const req = request(url, {
      method: 'POST',
      localAddress,
      // A fresh connection per request, so the address is the one asked for.
      agent: false,
      headers: { 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) },
    }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (chunk: Buffer) => chunks.push(chunk))
      res.on('error', reject)
      res.on('end', () => {
        const text = Buffer.concat(chunks).toString('utf8')
        const headers = new Headers()
        for (const [name, value] of Object.entries(res.headers)) {
          if (value !== undefined) headers.set(name, Array.isArray(value) ? value.join(', ') : value)
        }
        const parsed = res.headers['content-type']?.includes('json') && text ? JSON.parse(text) : text
        resolve(replyOf(res.statusCode ?? 0, headers, text, parsed))
      })
    })
    req.on('error', reject)
    req.end(body)
  })
}
