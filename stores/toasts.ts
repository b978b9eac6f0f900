import { defineStore } from 'pinia'

export type ToastTone = 'ok' | 'info' | 'warning' | 'danger'

export interface Toast {
  id: number
  tone: ToastTone
  title: string
  message?: string
  // Milliseconds; 0 keeps the toast until it is dismissed.
  timeout: number
}

export type ToastInput = Omit<Toast, 'id' | 'timeout' | 'tone'> & { tone?: ToastTone, timeout?: number }

// Problems stay until read; good news fades. Long enough to read a sentence twice (WCAG 2.2.1).
const DEFAULT_TIMEOUT: Record<ToastTone, number> = { ok: 6000, info: 8000, warning: 0, danger: 0 }
const MAX_VISIBLE = 4

export const useToastStore = defineStore('toasts', () => {
  const toasts = ref<Toast[]>([])
  let nextId = 1
  const timers = new Map<number, ReturnType<typeof setTimeout>>()

  function dismiss(id: number) {
    const timer = timers.get(id)
    if (timer) clearTimeout(timer)
    timers.delete(id)
    toasts.value = toasts.value.filter((toast) => toast.id !== id)
  }

  function push(input: ToastInput): number {
    const tone = input.tone ?? 'info'
    const toast: Toast = { ...input, tone, id: nextId++, timeout: input.timeout ?? DEFAULT_TIMEOUT[tone] }
    toasts.value = [...toasts.value, toast].slice(-MAX_VISIBLE)
    // Timers only run in the browser; a toast raised during SSR waits for hydration.
    if (toast.timeout > 0 && import.meta.client) {
      timers.set(toast.id, setTimeout(() => dismiss(toast.id), toast.timeout))
    }
    return toast.id
  }

  // Hovering or focusing a toast pauses its timer, so nobody loses a message mid-read.
  function hold(id: number) {
    const timer = timers.get(id)
    if (timer) clearTimeout(timer)
    timers.delete(id)
  }

  function release(id: number) {
    const toast = toasts.value.find((item) => item.id === id)
    if (toast && toast.timeout > 0 && import.meta.client && !timers.has(id)) {
      timers.set(id, setTimeout(() => dismiss(id), toast.timeout))
    }
  }

  function clear() {
    for (const timer of timers.values()) clearTimeout(timer)
    timers.clear()
    toasts.value = []
  }

  return { toasts, push, dismiss, hold, release, clear }
})
