import type { FetchError } from 'ofetch'
import type { z } from 'zod'

interface FieldIssue { field?: string, message?: string }

/**
 * Field errors for a form, from the same zod schema the route uses (before sending) and from
 * the server's answer (`data.issues[]`) after. `errors.x` is the text beside field x.
 */
export function useFormErrors() {
  const errors = reactive<Record<string, string>>({})
  const general = ref<string | null>(null)

  function clear() {
    for (const key of Object.keys(errors)) delete errors[key]
    general.value = null
  }

  function place(field: string | undefined, message: string) {
    const key = field && field !== '(body)' ? field : ''
    if (key) errors[key] ||= message
    else general.value ||= message
  }

  /** Returns the parsed value, or null with the errors placed. */
  function validate<S extends z.ZodType>(schema: S, value: unknown): z.output<S> | null {
    clear()
    const result = schema.safeParse(value)
    if (result.success) return result.data
    for (const issue of result.error.issues) place(issue.path.join('.'), issue.message)
    return null
  }

  /** Places the server's issues; returns the status code so callers can react (409…). */
  function fromServer(error: unknown): number {
    clear()
    const e = error as FetchError
    const body = e.data as { statusMessage?: string, data?: { issues?: FieldIssue[], field?: string } } | undefined
    if (!e.statusCode || e.statusCode >= 500) {
      general.value = 'Halocline could not save this. Please try again shortly.'
      return e.statusCode ?? 0
    }
    const issues = body?.data?.issues
    if (issues?.length) {
      for (const issue of issues) place(issue.field, issue.message ?? 'Check this value')
    } else {
      // statusMessage starts with the field name when there is one: "code: already exists".
      const text = body?.statusMessage ?? 'This could not be saved.'
      const match = /^([\w.]+): (.*)$/.exec(text)
      if (match && body?.data?.field) place(match[1], match[2]!)
      else general.value = text
    }
    return e.statusCode
  }

  return { errors, general, clear, validate, fromServer }
}
