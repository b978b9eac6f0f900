/** Where to go after signing in: only a path on this site ("/review" yes; "//elsewhere.example" and "https://…" no). */
export function safeNextPath(value: unknown): string {
  const next = Array.isArray(value) ? value[0] : value
  return typeof next === 'string' && /^\/(?![/\\])/.test(next) && next.length <= 2000 ? next : '/'
}
