import { randomBytes, scrypt, timingSafeEqual } from 'node:crypto'
import { availableParallelism } from 'node:os'
import { hash as argon2Hash, parseOptions, verify as argon2Verify, type Algorithm } from '@node-rs/argon2'
import { WorkGate } from './work-gate'

// OWASP Password Storage Cheat Sheet: argon2id with m = 19 MiB, t = 2, p = 1. Stored as the PHC
// string ($argon2id$v=19$m=19456,t=2,p=1$salt$hash), which carries its own parameters.
const ARGON2ID = {
  // Algorithm.Argon2id: an ambient const enum, which isolated modules cannot read.
  algorithm: 2 as Algorithm,
  memoryCost: 19456,
  timeCost: 2,
  parallelism: 1,
}

// Hashes run on libuv's thread pool (UV_THREADPOOL_SIZE, 4 by default), which file reads and Web
// Crypto (session cookies) share, and each takes 19 MiB. One more at once than there are cores,
// since a slot also waits on the database while its attempt is reserved, but never the whole
// pool. Waiting costs little, but a flood must not queue without bound: past 256 waiting,
// callers are told to come back (503).
const POOL_THREADS = Number(process.env.UV_THREADPOOL_SIZE) || 4
const gate = new WorkGate(Math.max(1, Math.min(availableParallelism() + 1, POOL_THREADS - 1)), 256)
// Older hashes: scrypt needs 128 MiB at N = 2^17, so only two of those at a time.
const scryptGate = new WorkGate(2, Number.POSITIVE_INFINITY)

/** The hashing queue is full: answered as 503 with Retry-After (server/error-handler.ts). */
export class PasswordQueueFullError extends Error {
  override name = 'PasswordQueueFullError'
  constructor() {
    super('Too many password checks are waiting')
  }
}

/** What may be done while holding a hashing slot. */
export interface PasswordHasher {
  hash(password: string): Promise<string>
  verify(stored: string, password: string): Promise<boolean>
  /** The same work as `verify` against a real hash, for an e-mail with no usable password. */
  verifyNothing(password: string): Promise<false>
}

/**
 * Runs `work` holding one of the few hashing slots. Everything that hashes goes through here,
 * so memory and the thread pool stay bounded; never call the slotted helpers below inside it.
 */
export function withPasswordSlot<T>(work: (hasher: PasswordHasher) => Promise<T>): Promise<T> {
  if (!gate.hasRoom()) return Promise.reject(new PasswordQueueFullError())
  return gate.run(() => work(hasher))
}

export function hashUserPassword(password: string): Promise<string> {
  return withPasswordSlot((h) => h.hash(password))
}

export function verifyUserPassword(stored: string, password: string): Promise<boolean> {
  return withPasswordSlot((h) => h.verify(stored, password))
}

/** True when a hash is not argon2id at today's parameters: rehash it at the next sign-in. */
export function passwordNeedsRehash(stored: string): boolean {
  if (!stored.startsWith('$argon2id$')) return true
  try {
    const o = parseOptions(stored)
    return o.memoryCost !== ARGON2ID.memoryCost || o.timeCost !== ARGON2ID.timeCost || o.parallelism !== ARGON2ID.parallelism
  } catch {
    return true
  }
}

const hasher: PasswordHasher = {
  hash: (password) => argon2Hash(password.normalize('NFKC'), ARGON2ID),
  async verify(stored, password) {
    if (stored.startsWith('$argon2')) {
      try {
        return await argon2Verify(stored, password.normalize('NFKC'))
      } catch {
        return false
      }
    }
    if (stored.startsWith('scrypt$')) return scryptGate.run(() => verifyScrypt(stored, password))
    return false
  },
  async verifyNothing(password) {
    dummyHash ??= argon2Hash(randomBytes(12).toString('base64'), ARGON2ID)
    await argon2Verify(await dummyHash, password.normalize('NFKC'))
    return false
  },
}

// Compared against when the e-mail is unknown or has no password yet, so response times do not
// reveal which addresses have accounts.
let dummyHash: Promise<string> | undefined

// The form written before argon2id: scrypt$log2N$r$p$salt$hash, base64.
async function verifyScrypt(stored: string, password: string): Promise<boolean> {
  const [, log2N, r, p, salt, hash] = stored.split('$')
  const N = 2 ** Number(log2N)
  const expected = Buffer.from(hash ?? '', 'base64')
  if (!salt || expected.length < 16 || !(N >= 2 && N <= 2 ** 20) || !(Number(r) >= 1) || !(Number(p) >= 1)) return false
  const key = await new Promise<Buffer>((resolve, reject) => {
    scrypt(password.normalize('NFKC'), Buffer.from(salt, 'base64'), expected.length,
      { N, r: Number(r), p: Number(p), maxmem: 256 * N * Number(r) },
      (err, derived) => (err ? reject(err) : resolve(derived)))
  })
  return key.length === expected.length && timingSafeEqual(key, expected)
}
