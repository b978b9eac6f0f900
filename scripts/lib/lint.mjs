import { spawnSync } from 'node:child_process'
import { existsSync, statSync } from 'node:fs'
import { join } from 'node:path'

// ESLint through the flat config Nuxt writes into .nuxt (eslint.config.mjs imports it). That file
// is made by `nuxt prepare` (npm's postinstall) and carries the stylistic options of
// nuxt.config.ts, so it is made again when missing or older than nuxt.config.ts.
function ensureNuxtLintConfig(root) {
  const generated = join(root, '.nuxt', 'eslint.config.mjs')
  const config = join(root, 'nuxt.config.ts')
  if (existsSync(generated) && statSync(generated).mtimeMs >= statSync(config).mtimeMs) return
  const nuxi = join(root, 'node_modules', 'nuxt', 'bin', 'nuxt.mjs')
  const env = { ...process.env, HALOCLINE_BUILD_TAG: '' }
  const result = spawnSync(process.execPath, [nuxi, 'prepare'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'], env })
  if (result.status !== 0) throw new Error('nuxt prepare failed, so .nuxt/eslint.config.mjs is missing')
}

// Returns { ok, note, output }: output is ESLint's report, printed by the caller when it failed.
export function runLint(root) {
  ensureNuxtLintConfig(root)
  const eslint = join(root, 'node_modules', 'eslint', 'bin', 'eslint.js')
  const result = spawnSync(process.execPath, [eslint, '.', '--max-warnings', '0'], {
    cwd: root, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024,
    env: { ...process.env, FORCE_COLOR: process.env.FORCE_COLOR ?? '1' },
  })
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`
  if (result.status === 0) return { ok: true, note: 'clean', output }
  const summary = output.match(/(\d+) problems? \((\d+) errors?, (\d+) warnings?\)/)
  const note = summary ? `${summary[1]} problems (${summary[2]} errors, ${summary[3]} warnings)` : 'ESLint could not run'
  return { ok: false, note, output }
}
