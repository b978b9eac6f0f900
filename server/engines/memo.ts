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
