import { describe, expect, it } from 'vitest'
import { hashUserPassword, passwordNeedsRehash, PasswordQueueFullError, verifyUserPassword, withPasswordSlot } from '../../server/utils/password'
import { WorkGate } from '../../server/utils/work-gate'

const b64 = (hex: string) => Buffer.from(hex.replace(/\s+/g, ''), 'hex').toString('base64')

describe('argon2id hashes', () => {
  it('writes the PHC string at OWASP parameters, with a fresh 16-byte salt each time', async () => {
    // OWASP Password Storage Cheat Sheet: argon2id, m = 19 MiB (19456 KiB), t = 2, p = 1.
    const [a, b] = await Promise.all([hashUserPassword('correct horse battery'), hashUserPassword('correct horse battery')])
    const phc = /^\$argon2id\$v=19\$m=19456,t=2,p=1\$([A-Za-z0-9+/]+)\$([A-Za-z0-9+/]+)$/
    expect(a).toMatch(phc)
    const [, salt, hash] = a.match(phc)!
    expect(Buffer.from(salt!, 'base64')).toHaveLength(16)
    expect(Buffer.from(hash!, 'base64')).toHaveLength(32)
    expect(b).not.toBe(a)
    expect(await verifyUserPassword(a, 'correct horse battery')).toBe(true)
    expect(await verifyUserPassword(b, 'correct horse battery')).toBe(true)
    expect(await verifyUserPassword(a, 'correct horse batterY')).toBe(false)
    expect(passwordNeedsRehash(a)).toBe(false)
  })

  it('verifies the argon2id vectors of the reference implementation', async () => {
    // phc-winner-argon2, src/test.c: password "password", salt "somesalt", t = 2, p = 1.
    const m256 = '$argon2id$v=19$m=256,t=2,p=1$c29tZXNhbHQ$nf65EOgLrQMR/uIPnA4rEsF5h7TKyQwu9U1bMCHGi/4'
    const m65536 = '$argon2id$v=19$m=65536,t=2,p=1$c29tZXNhbHQ$CTFhFdXPJO1aFaMaO6Mm5c8y7cJHAph8ArZWb2GRPPc'
    expect(await verifyUserPassword(m256, 'password')).toBe(true)
    expect(await verifyUserPassword(m65536, 'password')).toBe(true)
    expect(await verifyUserPassword(m256, 'passwore')).toBe(false)
    // Other parameters than today's: right, but to be rehashed at the next sign-in.
    expect(passwordNeedsRehash(m256)).toBe(true)
    expect(passwordNeedsRehash(m65536)).toBe(true)
  })

  it('treats the same text in another Unicode form as the same password', async () => {
    // U+00E9 and e + U+0301 are one character under NFKC (Unicode Standard Annex #15).
    const stored = await hashUserPassword('caf\u00e9 au lait, bitte')
    expect(await verifyUserPassword(stored, 'cafe\u0301 au lait, bitte')).toBe(true)
  })
})

describe('scrypt hashes written before argon2id', () => {
  // RFC 7914, section 12: scrypt("pleaseletmein", "SodiumChloride", N = 16384, r = 8, p = 1, dkLen = 64).
  const rfcKey = `7023bdcb3afd7348461c06cd81fd38ebfda8fbba904f8e3ea9b543f6545da1f2
    d5432955613f0fcf62d49705242a9af9e61e85dc0d651e40dfcf017b45575887`
  const rfcStored = ['scrypt', 14, 8, 1, Buffer.from('SodiumChloride').toString('base64'), b64(rfcKey)].join('$')

  it('verifies a stored scrypt hash and refuses a wrong password', async () => {
    expect(await verifyUserPassword(rfcStored, 'pleaseletmein')).toBe(true)
    expect(await verifyUserPassword(rfcStored, 'pleaseletmeout')).toBe(false)
    // The form as it was written (32-byte key): the first half of the same output.
    const short = ['scrypt', 14, 8, 1, Buffer.from('SodiumChloride').toString('base64'), b64(rfcKey.replace(/\s+/g, '').slice(0, 64))].join('$')
    expect(await verifyUserPassword(short, 'pleaseletmein')).toBe(true)
  })

  it('always needs a rehash', () => {
    expect(passwordNeedsRehash(rfcStored)).toBe(true)
  })

  it('refuses damaged or foreign hashes without throwing', async () => {
    for (const stored of ['', 'scrypt$14$8$1$$', 'scrypt$40$8$1$c2FsdA==$' + b64('00'.repeat(32)), 'bcrypt$whatever',
      '$argon2id$v=19$m=19456,t=2,p=1$broken', '$argon2id$nonsense']) {
      expect(await verifyUserPassword(stored, 'pleaseletmein')).toBe(false)
      expect(passwordNeedsRehash(stored)).toBe(true)
    }
  })
})

describe('hashing slots', () => {
  it('run a few at a time, hand over in arrival order and refuse past the queue', async () => {
    const gate = new WorkGate(2, 3)
    const order: number[] = []
    let running = 0
    let peak = 0
    const releases: Array<() => void> = []
    const task = (n: number) => gate.run(async () => {
      running++
      peak = Math.max(peak, running)
      await new Promise<void>((resolve) => releases.push(resolve))
      order.push(n)
      running--
    })
    const all = [1, 2, 3, 4, 5].map(task)
    expect(gate.hasRoom()).toBe(false)
    while (order.length < 5) {
      await new Promise((r) => setTimeout(r, 1))
      releases.shift()?.()
    }
    await Promise.all(all)
    expect(peak).toBe(2)
    expect(order).toEqual([1, 2, 3, 4, 5])
    expect(gate.hasRoom()).toBe(true)
  })

  it('lets the password check and the hash share one slot', async () => {
    const stored = await withPasswordSlot(async (h) => h.hash('one slot for both'))
    const both = await withPasswordSlot(async (h) => [await h.verify(stored, 'one slot for both'), await h.verifyNothing('one slot for both')])
    expect(both).toEqual([true, false])
  })
  it('refuses new work once the slots and the waiting line are full, and takes it again after', async () => {
    let open!: () => void
    const held = new Promise<void>((resolve) => { open = resolve })
    const queued: Array<Promise<unknown>> = []
    let refused: unknown
    // Fill every slot and the whole waiting line; the one after must be refused at once.
    for (let i = 0; i < 1000 && !refused; i++) {
      const work = withPasswordSlot(() => held)
      work.catch((error) => { refused = error })
      queued.push(work.catch(() => {}))
      await Promise.resolve()
    }
    expect(refused).toBeInstanceOf(PasswordQueueFullError)
    // 256 waiting plus the few running: never fewer than the line, never unbounded.
    expect(queued.length).toBeGreaterThan(256)
    expect(queued.length).toBeLessThan(300)
    open()
    await Promise.all(queued)
    expect(await withPasswordSlot(async (h) => h.verifyNothing('after the flood'))).toBe(false)
  })
})
