// Unsealing nuxt-auth-utils' cookie costs far more than the route behind it, and every
// request needs the account's session version too. Both are cached briefly per process.
const SESSION_TTL_MS = 60_000
// runtimeConfig.sessionVersionCacheSeconds (NUXT_SESSION_VERSION_CACHE_SECONDS), read once.
let accountTtlMs: number | undefined
const accountTtl = () => (accountTtlMs ??= Number(useRuntimeConfig().sessionVersionCacheSeconds ?? 3) * 1000)
const MAX_ENTRIES = 10_000

export interface CachedSession {
  id: string
  createdAt: number
  data: Record<string, unknown>
}

export interface AccountState {
  sessionVersion: number
  disabled: boolean
}

// Keyed by the sealed cookie itself: a digest of it cost more per request (sha256 and base64)
// than the Map's own string hashing, and the cookie is in this process's memory either way.
const sessions = new Map<string, { value: CachedSession, expires: number }>()
const accounts = new Map<number, { value: AccountState, expires: number }>()

function boundedSet<K, V>(map: Map<K, V>, key: K, value: V) {
  // Maps iterate in insertion order, so the first key is the oldest.
  if (map.size >= MAX_ENTRIES) map.delete(map.keys().next().value as K)
  map.set(key, value)
}

function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object' && !Object.isFrozen(value)) {
    for (const inner of Object.values(value)) deepFreeze(inner)
    Object.freeze(value)
  }
  return value
}

/**
 * The session h3 would unseal from this cookie. Its data is a fresh object each time (h3 writes
 * a session's changes into `data`); what lies below it is frozen and shared, not cloned per request.
 */
export function getCachedSession(key: string): CachedSession | undefined {
  const hit = sessions.get(key)
  if (!hit || hit.expires < Date.now()) return undefined
  return { id: hit.value.id, createdAt: hit.value.createdAt, data: { ...hit.value.data } }
}

export function cacheSession(key: string, value: CachedSession) {
  const copy = { id: value.id, createdAt: value.createdAt, data: deepFreeze(structuredClone(value.data)) }
  boundedSet(sessions, key, { value: copy, expires: Date.now() + SESSION_TTL_MS })
}

export function forgetSession(key: string) {
  sessions.delete(key)
}

/**
 * The account's session version and state, from this process's copy when `keep` (the process
 * hears other processes' changes: account-notices.ts), else from `load` every time.
 */
export async function getAccountState(userId: number, load: () => Promise<AccountState | undefined>, keep = true) {
  const hit = keep ? accounts.get(userId) : undefined
  if (hit && hit.expires >= Date.now()) return hit.value
  const value = await load()
  if (value && keep) boundedSet(accounts, userId, { value, expires: Date.now() + accountTtl() })
  return value
}

/** Call after bumping a session version or disabling an account (announceAccountChange does), so this process sees it at once. */
export function forgetAccount(userId: number) {
  accounts.delete(userId)
}

export function forgetAllAccounts() {
  accounts.clear()
}
