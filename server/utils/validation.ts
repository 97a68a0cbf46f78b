import type { H3Event } from 'h3'
import type { z } from 'zod'
import { fieldErrorsFrom } from '#shared/utils/field-errors'

function invalid(error: z.ZodError, where: string) {
  return createError({
    statusCode: 400,
    statusMessage: 'Invalid input',
    message: `Some ${where} fields need attention`,
    data: { fieldErrors: fieldErrorsFrom(error) },
  })
}

export async function readValidated<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.output<T>> {
  let body: unknown
  try {
    body = await readBody(event)
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The body is not valid JSON', data: { fieldErrors: { _: ['The body is not valid JSON'] } } })
  }
  const result = schema.safeParse(body ?? {})
  if (!result.success) throw invalid(result.error, 'body')
  return result.data
}

export async function queryValidated<T extends z.ZodType>(event: H3Event, schema: T): Promise<z.output<T>> {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) throw invalid(result.error, 'query')
  return result.data
}

/** An id that is not even well-formed names nothing the caller can see: 404, like any unknown id. */
export function paramsValidated<T extends z.ZodType>(event: H3Event, schema: T, what = 'Not found'): z.output<T> {
  const result = schema.safeParse(getRouterParams(event, { decode: true }))
  if (!result.success) throw createError({ statusCode: 404, statusMessage: what })
  return result.data
}
