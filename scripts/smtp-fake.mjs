#!/usr/bin/env node
// The local stand-in for a hosted mail provider: a real SMTP server on 127.0.0.1 that keeps
// every message it accepts as an .eml file. Usage: node scripts/smtp-fake.mjs --port 2525 --dir .data/mail
// For fault tests, --hold-file PATH: while that file exists, new connections get no greeting
// (a sender is caught mid-delivery, with nothing accepted yet); each held one prints a line.
import { existsSync, mkdirSync, writeFileSync, createWriteStream, renameSync, rmSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { parseArgs } from 'node:util'
import { SMTPServer } from 'smtp-server'

const { values } = parseArgs({
  options: {
    'port': { type: 'string', default: process.env.HALOCLINE_SMTP_PORT ?? '2525' },
    'dir': { type: 'string', default: '.data/mail' },
    'pid-file': { type: 'string' },
    'hold-file': { type: 'string' },
  },
})
const dir = resolve(values.dir)
mkdirSync(dir, { recursive: true })
let counter = 0

const server = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS', 'AUTH'],
  logger: false,
  size: 25 * 1024 * 1024,
  onConnect(session, callback) {
    const hold = values['hold-file']
    if (!hold || !existsSync(hold)) return callback()
    console.log(`[smtp-fake] holding connection ${session.id}`)
    const timer = setInterval(() => {
      if (existsSync(hold)) return
      clearInterval(timer)
      callback()
    }, 50)
  },
  onData(stream, session, callback) {
    const name = `${new Date().toISOString().replace(/[:.]/g, '-')}-${process.pid}-${++counter}.eml`
    // Write under a temporary name and rename when complete, so readers never see half a message.
    const partial = join(dir, `.${name}.part`)
    const out = createWriteStream(partial)
    stream.pipe(out)
    stream.on('error', (error) => callback(error))
    out.on('finish', () => {
      if (stream.sizeExceeded) {
        rmSync(partial, { force: true })
        return callback(Object.assign(new Error('Message too large'), { responseCode: 552 }))
      }
      renameSync(partial, join(dir, name))
      callback(null, `Queued as ${name}`)
    })
  },
})

let listening = false
server.on('error', (error) => {
  console.error(`[smtp-fake] ${error.message}`)
  // A sender that hangs up mid-message (killed, timed out) ends only its own conversation.
  if (!listening) process.exit(1)
})

server.listen(Number(values.port), '127.0.0.1', () => {
  listening = true
  if (values['pid-file']) writeFileSync(values['pid-file'], String(process.pid))
  console.log(`[smtp-fake] listening on 127.0.0.1:${values.port}, saving to ${dir}`)
})

for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => server.close(() => process.exit(0)))
}
