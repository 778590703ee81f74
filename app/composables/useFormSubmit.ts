// The submit path of every form: check the values with the same zod schema the server uses,
// show a message beside each field or one for the form, send, and keep the button busy
// meanwhile. One place, so every form answers alike.
import type { ZodError } from 'zod'

interface Schema<Out> {
  safeParse(value: unknown): { success: true, data: Out } | { success: false, error: ZodError }
}

export function useFormSubmit<Out, Created>(schema: Schema<Out>, send: (data: Out) => Promise<Created>, failMessage: string) {
  const errors = ref<Record<string, string>>({})
  const formError = ref('')
  const busy = ref(false)

  /** The answer, or undefined when the values or the request were refused (the reason is shown). */
  async function submit(values: unknown): Promise<Created | undefined> {
    formError.value = ''
    const parsed = schema.safeParse(values)
    if (!parsed.success) {
      errors.value = fieldErrors(parsed.error)
      return undefined
    }
    errors.value = {}
    busy.value = true
    try {
      return await send(parsed.data)
    } catch (e) {
      formError.value = errorMessage(e, failMessage)
      return undefined
    } finally {
      busy.value = false
    }
  }

  return { errors, formError, busy, submit }
}
