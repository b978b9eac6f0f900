import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, readdirSync } from 'node:fs'
import { fail } from './steps.mjs'

export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0

export function checkNodeVersion() {
  const [major, minor] = process.versions.node.split('.').map(Number)
  const ok = (major === 20 && minor >= 19) || (major === 22 && minor >= 12) || major > 22
  if (!ok) fail(`Node.js ${process.versions.node} is too old`, 'install Node.js 20.19 or newer (20.x is what Halocline is tested on)')
  return `Node.js ${process.versions.node}`
}

export function postgresBinDir() {
  const root = '/usr/lib/postgresql'
  if (!existsSync(root)) return null
  const versions = readdirSync(root).filter((v) => existsSync(`${root}/${v}/bin/pg_ctl`)).sort((a, b) => Number(b) - Number(a))
  return versions.length ? `${root}/${versions[0]}/bin` : null
}

function aptInstall(packages) {
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  const update = spawnSync('apt-get', ['update', '-q'], { stdio: 'ignore', env })
  if (update.status !== 0) fail('apt-get update failed', `install ${packages.join(' ')} with your system's package manager`)
  const install = spawnSync('apt-get', ['install', '-y', '-q', ...packages], { stdio: 'ignore', env })
  if (install.status !== 0) fail(`apt-get install ${packages.join(' ')} failed`, `run: apt-get install -y ${packages.join(' ')}`)
}

export function ensurePostgres() {
  let bin = postgresBinDir()
  if (bin) return bin.split('/').at(-2) ? `PostgreSQL ${bin.split('/').at(-2)}` : 'present'
  if (!isRoot) {
    fail('PostgreSQL server binaries are missing', 'run as root: apt-get install -y postgresql (Debian/Ubuntu), then npm start again')
  }
  aptInstall(['postgresql'])
  bin = postgresBinDir()
  if (!bin) fail('postgresql installed but pg_ctl was not found', 'check /usr/lib/postgresql/*/bin')
  return `installed PostgreSQL ${bin.split('/').at(-2)}`
}

export function chromiumPath() {
  return ['/usr/bin/chromium', '/usr/bin/chromium-browser'].find((p) => existsSync(p)) ?? null
}

export function ensureChromium() {
  if (chromiumPath()) return 'present'
  if (!isRoot) fail('Chromium is missing (browser tests need it)', 'run as root: apt-get install -y chromium')
  aptInstall(['chromium'])
  if (!chromiumPath()) fail('chromium installed but /usr/bin/chromium is missing', 'check the chromium package')
  return 'installed'
}

/** Runs a command as the postgres user when we are root (initdb refuses to run as root). */
export function asPostgres(command, args, options = {}) {
  const [cmd, argv] = isRoot ? ['runuser', ['-u', 'postgres', '--', command, ...args]] : [command, args]
  return execFileSync(cmd, argv, { stdio: ['ignore', 'pipe', 'pipe'], ...options }).toString()
}
