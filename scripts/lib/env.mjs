import { randomBytes } from 'node:crypto'
import { existsSync, readFileSync, writeFileSync } from 'node:fs'

export function readEnvFile(path) {
  if (!existsSync(path)) return {}
  const values = {}
  for (const line of readFileSync(path, 'utf8').split('\n')) {
    const match = /^\s*([A-Z0-9_]+)\s*=\s*(.*)\s*$/.exec(line)
    if (match) values[match[1]] = match[2].replace(/^(['"])(.*)\1$/, '$2')
  }
  return values
}

export const randomSecret = (bytes = 32) => randomBytes(bytes).toString('base64url')

/** Adds the secrets a fresh checkout lacks; never overwrites what is there. */
export function ensureEnvFile(path) {
  const current = readEnvFile(path)
  const wanted = {
    NUXT_SESSION_PASSWORD: randomSecret(32),
    HALOCLINE_PG_PASSWORD: randomSecret(18),
    HALOCLINE_IDP_CLIENT_SECRET: randomSecret(18),
  }
  const missing = Object.entries(wanted).filter(([key]) => !current[key])
  if (!missing.length) return { values: current, created: false }
  const header = existsSync(path) ? '' : '# Written by npm start. Secrets for this checkout only; git-ignored.\n'
  const previous = existsSync(path) ? readFileSync(path, 'utf8').replace(/\n?$/, '\n') : ''
  writeFileSync(path, previous + header + missing.map(([k, v]) => `${k}=${v}`).join('\n') + '\n', { mode: 0o600 })
  return { values: { ...current, ...Object.fromEntries(missing) }, created: true }
}
