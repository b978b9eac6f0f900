import { existsSync, readFileSync, readdirSync, readlinkSync } from 'node:fs'
import { createServer, connect } from 'node:net'

export function freePort() {
  return new Promise((resolve, reject) => {
    const server = createServer()
    server.unref()
    server.on('error', reject)
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address()
      server.close(() => resolve(port))
    })
  })
}

/**
 * Runs `start(port)` on a free port, and on another if it fails. A port is free only when
 * freePort() looks: another test world, or an outgoing connection, can take it before our
 * child binds it (the child then ends, or someone else answers there).
 * @template T
 * @param {(port: number) => Promise<T>} start
 * @returns {Promise<T>}
 */
export async function onFreePort(start, tries = 3) {
  for (let attempt = 1; ; attempt++) {
    const port = await freePort()
    try {
      return await start(port)
    } catch (error) {
      if (attempt >= tries) throw error
    }
  }
}

export function isPortOpen(port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const socket = connect({ port, host })
    socket.once('connect', () => { socket.destroy(); resolve(true) })
    socket.once('error', () => resolve(false))
  })
}

// A TCP listener's socket inode, per /proc/net/tcp(6): the port is the hex after the colon of
// the local address, state 0A is LISTEN, the inode is the tenth column.
function listeningInodes(port) {
  const hexPort = port.toString(16).toUpperCase().padStart(4, '0')
  const inodes = new Set()
  for (const table of ['/proc/net/tcp', '/proc/net/tcp6']) {
    if (!existsSync(table)) continue
    for (const line of readFileSync(table, 'utf8').split('\n').slice(1)) {
      const cols = line.trim().split(/\s+/)
      if (cols[3] === '0A' && cols[1]?.endsWith(`:${hexPort}`)) inodes.add(cols[9])
    }
  }
  return inodes
}

/**
 * Whether process `pid` itself listens on `port`. Seeing the port open is not enough: when our
 * child could not bind it, whoever did would answer in its place (another world's SMTP fake,
 * another test's server). Reads /proc where there is one; elsewhere, anyone listening counts.
 */
export async function listensOn(pid, port) {
  if (!existsSync('/proc/net/tcp')) return isPortOpen(port)
  const inodes = listeningInodes(port)
  if (!inodes.size) return false
  let fds
  try {
    fds = readdirSync(`/proc/${pid}/fd`)
  } catch {
    return false
  }
  return fds.some((fd) => {
    try {
      return inodes.has(/^socket:\[(\d+)\]$/.exec(readlinkSync(`/proc/${pid}/fd/${fd}`))?.[1])
    } catch {
      return false
    }
  })
}

/**
 * Waits until `child` listens on `port` itself: 'up', 'ended' (it exited first, usually because
 * the port was taken) or 'timeout'.
 * @param {import('node:child_process').ChildProcess} child
 */
export async function childListening(child, port, timeoutMs) {
  let ended = child.exitCode !== null || child.signalCode !== null
  child.once('exit', () => { ended = true })
  const settled = await waitFor(async () => ended || (await listensOn(child.pid, port)), { timeoutMs })
  if (ended) return 'ended'
  return settled ? 'up' : 'timeout'
}

export async function waitFor(check, { timeoutMs = 20_000, intervalMs = 100 } = {}) {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    if (await check()) return true
    await new Promise((r) => setTimeout(r, intervalMs))
  }
  return false
}
