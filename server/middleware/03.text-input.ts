// PostgreSQL cannot store a NUL character in text or jsonb: caught once here, for the query of every
// request and every JSON body, and answered 400 naming the field (instead of a 500 from the database).
const NUL = '\u0000'
const WRITE_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

/** The path ('data.findings.0.note', 'q') of the first string or key holding a NUL, walking without recursion. */
export function fieldWithNul(value: unknown): string | null {
  const stack: [unknown, string][] = [[value, '']]
  while (stack.length) {
    const [current, path] = stack.pop()!
    if (typeof current === 'string') {
      if (current.includes(NUL)) return path || '_'
    }
    else if (current && typeof current === 'object') {
      for (const [key, child] of Object.entries(current)) {
        const childPath = path ? `${path}.${key}` : key
        if (key.includes(NUL)) return childPath.replaceAll(NUL, '\\0')
        stack.push([child, childPath])
      }
    }
  }
  return null
}

function refuse(field: string, where: string) {
  const message = 'Contains a NUL character (\\0), which text cannot hold'
  return createError({ statusCode: 400, statusMessage: 'Invalid input', message: `Some ${where} fields need attention`, data: { fieldErrors: { [field]: [message] } } })
}

export default defineEventHandler(async (event) => {
  const queryField = fieldWithNul(getQuery(event))
  if (queryField) throw refuse(queryField, 'query')
  if (!WRITE_METHODS.has(event.method) || !getRequestHeader(event, 'content-type')?.includes('application/json')) return
  let body: unknown
  try {
    // h3 keeps the parsed body: the route's readBody gets the same object without parsing again.
    body = await readBody(event)
  }
  catch {
    return // not JSON: the route answers that itself
  }
  const bodyField = fieldWithNul(body)
  if (bodyField) throw refuse(bodyField, 'body')
})
