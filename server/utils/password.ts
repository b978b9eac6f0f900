import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto'

// OWASP password storage guidance: scrypt N = 2^17, r = 8, p = 1. One hash needs 128 MiB,
// so hashing is bounded to a couple at a time: a burst of sign-ins must not exhaust memory.
const PARAMS = { log2N: 17, r: 8, p: 1 }
const KEY_LENGTH = 32
const MAX_CONCURRENT = 2

let running = 0
const waiting: Array<() => void> = []

async function withSlot<T>(work: () => Promise<T>): Promise<T> {
  if (running >= MAX_CONCURRENT) await new Promise<void>((resolve) => waiting.push(resolve))
  running++
  try {
    return await work()
  } finally {
    running--
    waiting.shift()?.()
  }
}

function derive(password: string, salt: Buffer, log2N: number, r: number, p: number): Promise<Buffer> {
  const N = 2 ** log2N
  const options: ScryptOptions = { N, r, p, maxmem: 256 * N * r }
  return withSlot(() => new Promise((resolve, reject) => {
    scrypt(password.normalize('NFKC'), salt, KEY_LENGTH, options, (err, key) => (err ? reject(err) : resolve(key)))
  }))
}

/** Returns `scrypt$log2N$r$p$salt$hash` (base64), so parameters can be raised later per hash. */
export async function hashUserPassword(password: string): Promise<string> {
  const salt = randomBytes(16)
  const key = await derive(password, salt, PARAMS.log2N, PARAMS.r, PARAMS.p)
  return ['scrypt', PARAMS.log2N, PARAMS.r, PARAMS.p, salt.toString('base64'), key.toString('base64')].join('$')
}

export async function verifyUserPassword(stored: string, password: string): Promise<boolean> {
  const [scheme, log2N, r, p, salt, hash] = stored.split('$')
  if (scheme !== 'scrypt' || !salt || !hash) return false
  const expected = Buffer.from(hash, 'base64')
  const key = await derive(password, Buffer.from(salt, 'base64'), Number(log2N), Number(r), Number(p))
  return key.length === expected.length && timingSafeEqual(key, expected)
}

// Verifying against this when the e-mail is unknown keeps response times alike,
// so timing does not reveal which addresses have accounts.
let dummyHash: Promise<string> | undefined
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashUserPassword(randomBytes(12).toString('base64'))
  return dummyHash
}
