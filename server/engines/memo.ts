// Remembers the answers of an async function by its argument (compared as JSON), keeping the
// most recently used `limit` of them. Calls made while the first is still running share its
// promise; a failure is not remembered, so the next call tries again.
export interface MemoizedAsync<A, R> {
  (arg: A): Promise<R>
  has(arg: A): boolean
  set(arg: A, value: Promise<R>): void
}

export function memoizeAsync<A, R>(limit: number, compute: (arg: A) => Promise<R>): MemoizedAsync<A, R> {
  const entries = new Map<string, Promise<R>>()
  const keyOf = (arg: A) => JSON.stringify(arg)
  const set = (key: string, value: Promise<R>) => {
    entries.delete(key)
    entries.set(key, value)
    // A Map iterates in insertion order: the first key is the least recently used.
    while (entries.size > limit) entries.delete(entries.keys().next().value!)
    value.catch(() => { if (entries.get(key) === value) entries.delete(key) })
  }
  const memoized = (arg: A): Promise<R> => {
    const key = keyOf(arg)
    const known = entries.get(key)
    if (known) {
      entries.delete(key)
      entries.set(key, known)
      return known
    }
    const value = compute(arg)
    set(key, value)
    return value
  }
  memoized.has = (arg: A) => entries.has(keyOf(arg))
  memoized.set = (arg: A, value: Promise<R>) => set(keyOf(arg), value)
  return memoized
}

/**
 * Remembers values by key up to a total size (the caller's measure: values held, characters),
 * least recently used first out; one larger than the whole budget is computed and not kept. A
 * promise that fails is forgotten, so the next call tries again. Keys must name every input.
 */
export function sizedMemo(limit: number) {
  const entries = new Map<string, { value: unknown, size: number }>()
  let held = 0
  const forget = (key: string) => {
    const entry = entries.get(key)
    if (!entry) return
    entries.delete(key)
    held -= entry.size
  }
  return function remember<T>(key: string, size: number, compute: () => T): T {
    const known = entries.get(key)
    if (known) {
      entries.delete(key)
      entries.set(key, known)
      return known.value as T
    }
    const value = compute()
    if (size > limit) return value
    while (held + size > limit) forget(entries.keys().next().value!)
    entries.set(key, { value, size })
    held += size
    if (value instanceof Promise) value.catch(() => { if (entries.get(key)?.value === value) forget(key) })
    return value
  }
}
