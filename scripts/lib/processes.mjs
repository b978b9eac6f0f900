import { spawn } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { childListening, isPortOpen } from './ports.mjs'
import { fail } from './steps.mjs'
import { outputDir } from './build.mjs'

/**
 * @param {{ root: string, port: number, dir: string, pidFile?: string, holdFile?: string, stdio?: any }} options
 */
export async function startSmtpFake({ root, port, dir, pidFile, holdFile, stdio = 'ignore' }) {
  if (await isPortOpen(port)) fail(`port ${port} is already in use`, 'set HALOCLINE_SMTP_PORT to a free port, or stop what uses it')
  const extra = [...(pidFile ? ['--pid-file', pidFile] : []), ...(holdFile ? ['--hold-file', holdFile] : [])]
  const child = spawn(process.execPath, [join(root, 'scripts', 'smtp-fake.mjs'), '--port', String(port), '--dir', dir, ...extra], {
    cwd: root, stdio, detached: false,
  })
  if ((await childListening(child, port, 10_000)) !== 'up') {
    child.kill()
    fail(`the SMTP fake did not start on port ${port}`, 'run node scripts/smtp-fake.mjs by hand to see why')
  }
  return child
}

/**
 * The provider's command line. Each value is joined to its option with "=": a random secret
 * that begins with "-" (base64url) is otherwise refused by parseArgs as a missing value.
 * @param {{ port: number, clientId: string, clientSecret: string, appUrl: string, pidFile?: string }} options
 */
export function identityProviderArgs({ port, clientId, clientSecret, appUrl, pidFile }) {
  const args = [`--port=${port}`, `--client-id=${clientId}`, `--client-secret=${clientSecret}`, `--app-url=${appUrl}`]
  if (pidFile) args.push(`--pid-file=${pidFile}`)
  return args
}

/**
 * The local identity provider (scripts/identity-provider.mjs) for an app at `appUrl`.
 * @param {{ root: string, port: number, clientId: string, clientSecret: string, appUrl: string, pidFile?: string, stdio?: any }} options
 */
export async function startIdentityProvider({ root, port, clientId, clientSecret, appUrl, pidFile, stdio = 'ignore' }) {
  if (await isPortOpen(port)) fail(`port ${port} is already in use`, 'set HALOCLINE_IDP_PORT to a free port, or stop what uses it')
  const args = identityProviderArgs({ port, clientId, clientSecret, appUrl, pidFile })
  const child = spawn(process.execPath, [join(root, 'scripts', 'identity-provider.mjs'), ...args], { cwd: root, stdio, detached: false })
  // A child that ends before it listens (its port taken meanwhile) fails at once, not after the wait.
  if ((await childListening(child, port, 30_000)) !== 'up') {
    child.kill()
    fail(`the local identity provider did not start on port ${port}`, 'run node scripts/identity-provider.mjs by hand to see why')
  }
  return child
}

/** The NUXT_CAMPUS_* settings that point the app at the local identity provider. */
export function localCampusEnv({ port, clientId, clientSecret }) {
  return {
    NUXT_CAMPUS_ISSUER: `http://127.0.0.1:${port}`,
    NUXT_CAMPUS_CLIENT_ID: clientId,
    NUXT_CAMPUS_CLIENT_SECRET: clientSecret,
    NUXT_CAMPUS_ID_CLAIM: 'campus_id',
  }
}

export function killPidFile(pidFile, signal = 'SIGTERM') {
  if (!existsSync(pidFile)) return false
  const pid = Number(readFileSync(pidFile, 'utf8'))
  rmSync(pidFile, { force: true })
  try {
    process.kill(pid, signal)
    return true
  } catch {
    return false
  }
}

/**
 * Starts the built server and waits until it answers HTTP (health may still say 503). `workers`
 * above 1 runs that many server processes on the one port behind Node's cluster module (cluster.mjs).
 */
export async function startServer({ root, port, env, stdio = ['ignore', 'pipe', 'inherit'], workers = 1 }) {
  if (await isPortOpen(port)) fail(`port ${port} is already in use`, 'set PORT to a free port, or stop what uses it')
  const entry = join(outputDir(root), 'server', 'index.mjs')
  const args = workers > 1 ? [join(root, 'scripts', 'lib', 'cluster.mjs'), entry, String(workers)] : [entry]
  const child = spawn(process.execPath, args, {
    cwd: root,
    stdio,
    env: {
      ...process.env,
      ...env,
      PORT: String(port),
      NITRO_PORT: String(port),
      HOST: '127.0.0.1',
      NITRO_HOST: '127.0.0.1',
      NODE_ENV: 'production',
    },
  })
  if ((await childListening(child, port, 30_000)) !== 'up') {
    child.kill()
    fail(`the Halocline server did not start on port ${port}`, 'run node .output/server/index.mjs by hand to see its error')
  }
  return child
}
