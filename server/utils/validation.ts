import type { H3Event } from 'h3'
import type { z } from 'zod'

export interface FieldIssue {
  field: string
  message: string
}

function issuesOf(error: z.ZodError): FieldIssue[] {
  return error.issues.map((issue) => ({ field: issue.path.join('.') || '(body)', message: issue.message }))
}

/** 400 naming the first bad field, with every issue in `data.issues` for forms. */
export function invalid(issues: FieldIssue[], statusCode = 400): never {
  const first = issues[0]
  throw createError({
    statusCode,
    statusMessage: first ? `${first.field}: ${first.message}` : 'Invalid request',
    data: { field: first?.field, issues },
  })
}

export function validate<T extends z.ZodType>(schema: T, value: unknown): z.output<T> {
  const result = schema.safeParse(value)
  if (!result.success) invalid(issuesOf(result.error))
  return result.data
}

export async function readBodyAs<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.output<T>> {
  let body: unknown
  try {
    body = await readBody(event)
  } catch {
    throw createError({ statusCode: 400, statusMessage: 'The request body is not valid JSON' })
  }
  return validate(schema, body ?? {})
}

export function readQueryAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getQuery(event))
}

export function readParamsAs<T extends z.ZodType>(event: H3Event, schema: T): z.output<T> {
  return validate(schema, getRouterParams(event))
}
