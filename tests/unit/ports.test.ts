import { spawn, type ChildProcess } from 'node:child_process'
import { createServer, type Server } from 'node:net'
import { afterEach, describe, expect, it } from 'vitest'
import { childListening, freePort, listensOn, onFreePort } from '../../scripts/lib/ports.mjs'

// A child started on a port someone else took must not pass for started: whoever holds the
// port would answer in its place (two test worlds once shared one SMTP fake this way).

const children: ChildProcess[] = []
const servers: Server[] = []
afterEach(() => {
  for (const child of children.splice(0)) child.kill('SIGKILL')
  for (const server of servers.splice(0)) server.close()
})

function listenIn(port: number) {
  const child = spawn(process.execPath, ['-e', `require('node:net').createServer().listen(${port}, '127.0.0.1')`], { stdio: 'ignore' })
  children.push(child)
  return child
}

async function holdPort(): Promise<number> {
  const server = createServer()
  servers.push(server)
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  return (server.address() as { port: number }).port
}

describe('a child that listens', () => {
  it('is up once it holds the port itself', async () => {
    const port = await freePort()
    const child = listenIn(port)
    expect(await childListening(child, port, 20_000)).toBe('up')
    expect(await listensOn(child.pid!, port)).toBe(true)
  })

  it('has ended, not started, when another process holds its port', async () => {
    const port = await holdPort()
    const child = listenIn(port)
    expect(await childListening(child, port, 20_000)).toBe('ended')
    expect(await listensOn(process.pid, port)).toBe(true)
  })

  it('is not taken for the listener of a port it never bound', async () => {
    const port = await holdPort()
    const idle = spawn(process.execPath, ['-e', 'setInterval(() => {}, 1000)'], { stdio: 'ignore' })
    children.push(idle)
    expect(await listensOn(idle.pid!, port)).toBe(false)
    expect(await childListening(idle, port, 300)).toBe('timeout')
  })
})

describe('onFreePort', () => {
  it('tries another port when the first start fails, and gives up after the last try', async () => {
    const tried: number[] = []
    const port = await onFreePort(async (p) => {
      tried.push(p)
      if (tried.length < 3) throw new Error('taken')
      return p
    })
    expect(tried).toHaveLength(3)
    expect(port).toBe(tried[2])
    await expect(onFreePort(async () => { throw new Error('always taken') }, 2)).rejects.toThrow('always taken')
  })
})
