import { createHash } from 'node:crypto'
import { spawnSync } from 'node:child_process'
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { join, relative } from 'node:path'
import { fail } from './steps.mjs'

// Everything that ends up in .output. Tests, scripts and docs are not part of the build.
const INPUTS = [
  'app.vue', 'error.vue', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json', 'tsconfig.json',
  'assets', 'components', 'composables', 'layouts', 'middleware', 'pages', 'plugins', 'public',
  'server', 'shared', 'stores', 'utils',
]

function* files(root, path) {
  const full = join(root, path)
  if (!existsSync(full)) return
  if (statSync(full).isDirectory()) {
    for (const entry of readdirSync(full).sort()) yield* files(root, join(path, entry))
  } else {
    yield path
  }
}

export function sourcesHash(root) {
  const hash = createHash('sha256')
  for (const input of INPUTS) {
    for (const file of files(root, input)) {
      hash.update(relative(root, join(root, file))).update('\0').update(readFileSync(join(root, file))).update('\0')
    }
  }
  return hash.digest('hex')
}

/** Where the build lives: .output, or .output-<tag> when HALOCLINE_BUILD_TAG is set (see nuxt.config.ts). */
export function outputDir(root) {
  const tag = process.env.HALOCLINE_BUILD_TAG?.replace(/[^\w-]/g, '')
  return join(root, tag ? `.output-${tag}` : '.output')
}

export function ensureBuild(root, { force = false } = {}) {
  const hash = sourcesHash(root)
  const stamp = join(outputDir(root), '.halocline-sources')
  const server = join(outputDir(root), 'server', 'index.mjs')
  if (!force && existsSync(server) && existsSync(stamp) && readFileSync(stamp, 'utf8') === hash) return 'up to date'
  const result = spawnSync(process.execPath, [join(root, 'node_modules', 'nuxt', 'bin', 'nuxt.mjs'), 'build'], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NODE_ENV: 'production' },
  })
  if (result.status !== 0) {
    const tail = `${result.stdout}${result.stderr}`.trim().split('\n').slice(-15).join('\n')
    fail(`nuxt build failed:\n${tail}`, 'fix the error above (npx nuxt build shows the whole log)')
  }
  writeFileSync(stamp, hash)
  return 'built'
}
