import type { z } from 'zod'
import { FetchError } from 'ofetch'
import type { FieldErrors } from '#shared/types'
import { fieldErrorsFrom } from '#shared/utils/field-errors'

/**
 * One way for every form: check with the same zod schema the server uses, send, and show
 * the server's field messages if it still refuses. What was typed stays when the network fails.
 * Resolves to what `send` returned, or undefined when nothing was sent or it failed: `send` must return a value.
 */
export function useForm<S extends z.ZodType>(schema: S) {
  const errors = ref<FieldErrors>({})
  const message = ref('')
  const pending = ref(false)
  const numberFields = provideNumberFields()

  // After a refusal, focus goes to the first field (in page order) with a message: the screen reader reads
  // its label and, through aria-describedby (UiField, UiNumberField), the message itself.
  async function focusFirstError() {
    if (!import.meta.client) return
    await nextTick()
    const fields = Object.keys(errors.value)
      .map(name => document.getElementById(name))
      .filter((field): field is HTMLElement => field !== null && field.matches('input, select, textarea, button, [tabindex]'))
      .sort((a, b) => (a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING ? -1 : 1))
    fields[0]?.focus()
  }

  async function submit<R>(values: unknown, send: (data: z.output<S>) => Promise<R>): Promise<R | undefined> {
    errors.value = {}
    message.value = ''
    // A typed number the parser refused: each number field shows the parser's own message (live, so it
    // goes away once the text reads), and nothing is sent.
    const unreadable = numberFields.check()
    if (Object.keys(unreadable).length) {
      message.value = 'Some fields need attention.'
      if (import.meta.client) document.getElementById(Object.keys(unreadable)[0]!)?.focus()
      return undefined
    }
    const parsed = schema.safeParse(values)
    if (!parsed.success) {
      errors.value = fieldErrorsFrom(parsed.error)
      message.value = 'Some fields need attention.'
      await focusFirstError()
      return undefined
    }
    pending.value = true
    try {
      return await send(parsed.data)
    }
    catch (error) {
      const { fieldErrors, text } = describeFetchError(error)
      errors.value = fieldErrors
      message.value = text
      await focusFirstError()
      return undefined
    }
    finally {
      pending.value = false
    }
  }

  return { errors, message, pending, submit }
}

export function describeFetchError(error: unknown): { fieldErrors: FieldErrors, text: string } {
  if (error instanceof FetchError) {
    if (!error.response) return { fieldErrors: {}, text: 'No connection: nothing was saved. What you typed is still here; try again when the signal is back.' }
    const data = error.data as { message?: string, statusMessage?: string, data?: { fieldErrors?: FieldErrors } } | undefined
    return { fieldErrors: data?.data?.fieldErrors ?? {}, text: data?.message || data?.statusMessage || error.statusMessage || 'Something went wrong.' }
  }
  return { fieldErrors: {}, text: 'Something went wrong.' }
}
