import { spawnSync } from 'node:child_process'
import { existsSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { fail } from './steps.mjs'

// npm writes node_modules/.package-lock.json on every install: its age tells whether the
// install is older than the lock file.
export function ensureNodeModules(root) {
  const lock = join(root, 'package-lock.json')
  const marker = join(root, 'node_modules', '.package-lock.json')
  if (existsSync(marker) && statSync(marker).mtimeMs >= statSync(lock).mtimeMs) return 'up to date'
  const result = spawnSync('npm', ['ci', '--no-audit', '--no-fund', '--loglevel=error'], {
    cwd: root,
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  if (result.status !== 0) fail('npm ci failed', 'check the network access to the npm registry and run npm ci by hand to see the error')
  return 'installed'
}
