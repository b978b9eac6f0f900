import { createHash } from 'node:crypto'

// Nuxt writes a few inline scripts (runtime config, payload bootstrap). Rather than allow
// 'unsafe-inline', hash exactly the scripts of each page. Styles stay 'unsafe-inline': Vue
// binds style attributes at render time and the stylesheet itself is same-origin.
const INLINE_SCRIPT = /<script(?![^>]*\bsrc=)([^>]*)>([\s\S]*?)<\/script>/gi

function scriptHashes(html: string): string[] {
  const hashes = new Set<string>()
  for (const [, attributes, body] of html.matchAll(INLINE_SCRIPT)) {
    if (/type=["']?application\/json/i.test(attributes ?? '') || !body) continue
    hashes.add(`'sha256-${createHash('sha256').update(body).digest('base64')}'`)
  }
  return [...hashes]
}

export function pagePolicy(html: string): string {
  return [
    `default-src 'self'`,
    `script-src 'self' ${scriptHashes(html).join(' ')}`.trim(),
    `style-src 'self' 'unsafe-inline'`,
    `img-src 'self' data: blob:`,
    `font-src 'self'`,
    `connect-src 'self'`,
    `frame-src 'self'`,
    `object-src 'none'`,
    `base-uri 'none'`,
    `form-action 'self'`,
    `frame-ancestors 'none'`,
  ].join('; ')
}

export default defineNitroPlugin((nitroApp) => {
  if (import.meta.dev) return
  nitroApp.hooks.hook('render:response', (response) => {
    if (typeof response.body !== 'string' || !response.body.includes('<html')) return
    response.headers ??= {}
    response.headers['content-security-policy'] = pagePolicy(response.body)
  })
})
