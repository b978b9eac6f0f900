import { createError, type H3Event } from 'h3'
import type { z } from 'zod'
import { readCappedBody } from './request-body'
import { forbiddenCharacter, codePointLabel, messageExcerpt } from '#shared/utils/text-input'

export interface FieldIssue {
  field: string
  message: string
}

/** A form shows one sentence a field; a body of 10,000 bad items still gets a short answer. */
const MAX_ISSUES = 50

// A path names fields by our own keys; a record key comes from the client, so it is quoted short.
const fieldPath = (path: PropertyKey[]) => path.map((p) => messageExcerpt(String(p), 60)).join('.')

function issuesOf(error: z.ZodError): FieldIssue[] {
  return error.issues.map((issue) => ({ field: fieldPath(issue.path) || '(body)', message: issue.message }))
}

/** 400 naming the first bad field, with the issues (at most 50) in `data.issues` for forms. */
export function invalid(issues: FieldIssue[], statusCode = 400): never {
  const first = issues[0]
  throw createError({
    statusCode,
    statusMessage: first ? `${first.field}: ${first.message}` : 'Invalid request',
    data: { field: first?.field, issues: issues.slice(0, MAX_ISSUES) },
  })
}

/**
 * 400 naming the first string (or key) anywhere in a parsed body, query or form that holds a
 * character no text may hold (NUL and the other controls, lone surrogates, noncharacters): the
 * same rule for every route, before its schema runs. Tabs and line breaks pass here; one-line
 * fields refuse them in their schema (`lineText`). Walks with its own stack: a deeply nested
 * body cannot exhaust the call stack.
 */
export function refuseControlCharacters(value: unknown, root: PropertyKey[] = []): void {
  const stack: Array<{ value: unknown, path: PropertyKey[] }> = [{ value, path: root }]
  const refuse = (path: PropertyKey[], text: string, what = '') =>
    invalid([{
      field: fieldPath(path) || '(body)',
      message: `Remove the control character ${codePointLabel(forbiddenCharacter(text)!)}${what}`,
    }])
  while (stack.length) {
    const { value: item, path } = stack.pop()!
    if (typeof item === 'string') {
      if (forbiddenCharacter(item)) refuse(path, item)
    } else if (Array.isArray(item)) {
      for (let i = item.length - 1; i >= 0; i--) stack.push({ value: item[i], path: [...path, i] })
    } else if (item && typeof item === 'object') {
      const entries = Object.entries(item)
      for (const [key] of entries) if (forbiddenCharacter(key)) refuse(path, key, ' from a key')
      for (let i = entries.length - 1; i >= 0; i--) stack.push({ value: entries[i]![1], path: [...path, entries[i]![0]] })
    }
  }
}

export function validate<T extends z.ZodType>(schema: T, value: unknown): z.output<T> {
  refuseControlCharacters(value)
  const result = schema.safeParse(value)
  if (!result.success) invalid(issuesOf(result.error))
  return result.data
}

/** No JSON body of ours comes near this (files go through readUpload); anything larger is refused unread. */
export const MAX_JSON_BYTES = 1_000_000

function bodyTooLarge() {
  return createError({ statusCode: 413, statusMessage: `The request body is larger than ${MAX_JSON_BYTES / 1_000_000} MB` })
}

/** The raw body as text, refused with 413 as soon as it passes the cap, declared or chunked. */
async function readCappedText(event: H3Event): Promise<string | undefined> {
  const body = await readCappedBody(event, MAX_JSON_BYTES, bodyTooLarge)
  return body?.length ? body.toString('utf8') : undefined
}

export async function readBodyAs<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.output<T>> {
  const text = await readCappedText(event)
  let body: unknown = {}
  if (text && text.trim() !== '') {
    try {
      body = JSON.parse(text)
    } catch {
      throw createError({ statusCode: 400, statusMessage: 'The request body is not valid JSON' })
    }
  }
  return validate(schema, body ?? {})
}

export function readQueryAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getQuery(event))
}

export function readParamsAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getRouterParams(event))
}
