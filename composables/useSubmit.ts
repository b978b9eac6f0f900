import type { Ref } from 'vue'
import type { FetchError } from 'ofetch'
import type { ToastTone } from '~/stores/toasts'

/** A toast: its title, or the title with a message and a tone ("ok" unless said). */
export type SubmitToast = string | { title: string, message?: string, tone?: ToastTone }

export interface SubmitOptions<T, Key> {
  /** Which of a component's actions runs, for `running` ("copy", a row's id); true when unnamed. */
  key?: Key
  /** Shown when the request succeeds, before `done`; may be built from the answer. */
  success?: SubmitToast | ((reply: T) => SubmitToast | undefined)
  /** Still busy: what follows a success (emit, refresh, navigate). Its errors count as the request's. */
  done?: (reply: T) => unknown
  /** A danger toast when it fails: its title, or the title with a message (`serverSentence` for the server's own). */
  failure?: string | { title: string, message?: string | ((error: unknown) => string | undefined) }
  /** After the failure is placed (fields, toast): for what only this form does (a 409 to confirm and send again). */
  onError?: (error: unknown, status: number) => unknown
}

/** The server's sentence in a refusal (`statusMessage`), if it sent one. */
export function serverSentence(error: unknown): string | undefined {
  return ((error as FetchError | undefined)?.data as { statusMessage?: string } | undefined)?.statusMessage
}

type FormErrors = Pick<ReturnType<typeof useFormErrors>, 'fromServer'>

/**
 * The submit of a form or button, written once: a busy flag while the request and its follow-up
 * run, the success toast, and a failure placed in the form's fields (via useFormErrors) or told
 * in a toast.
 *
 *   const { errors, general, validate, fromServer } = useFormErrors()
 *   const { busy, run } = useSubmit({ fromServer })
 *   async function save() {
 *     const body = validate(practicalPatchSchema, form)
 *     if (body) {
 *       await run(() => $fetch(`/api/practicals/${id}`, { method: 'PATCH', body }),
 *         { success: 'Practical saved', done: () => emit('saved') })
 *     }
 *   }
 *
 * `run` resolves true on success and false on failure; it never rejects. Busy is cleared before
 * a failure is handled, so `onError` may ask and send again.
 */
export function useSubmit<Key extends string | number = never>(form?: FormErrors) {
  const toast = useToast()
  const running = ref<Key | true | null>(null) as Ref<Key | true | null>
  const busy = computed(() => running.value !== null)

  function show(tone: ToastTone, text: SubmitToast) {
    const { title, message, tone: own } = typeof text === 'string' ? { title: text, message: undefined, tone: undefined } : text
    toast.push({ tone: own ?? tone, title, message })
  }

  async function fail<T>(error: unknown, options: SubmitOptions<T, Key>) {
    const status = form ? form.fromServer(error) : ((error as FetchError).statusCode ?? 0)
    const { failure } = options
    if (typeof failure === 'string') show('danger', failure)
    else if (failure) {
      const message = typeof failure.message === 'function' ? failure.message(error) : failure.message
      show('danger', { title: failure.title, message })
    } else if (!form && !options.onError) {
      show('danger', { title: 'That did not work', message: serverSentence(error) ?? 'Please try again shortly.' })
    }
    await options.onError?.(error, status)
  }

  async function run<T>(request: () => Promise<T>, options: SubmitOptions<T, Key> = {}): Promise<boolean> {
    running.value = options.key ?? true
    let failed: { error: unknown } | null = null
    try {
      const reply = await request()
      const success = typeof options.success === 'function' ? options.success(reply) : options.success
      if (success) show('ok', success)
      await options.done?.(reply)
    } catch (error) {
      failed = { error }
    } finally {
      running.value = null
    }
    if (!failed) return true
    await fail(failed.error, options)
    return false
  }

  return { busy, running: readonly(running), run }
}
