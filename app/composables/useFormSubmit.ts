// The submit path of every form: check the values with the same zod schema the server uses,
// show a message beside each field or one for the form, send, and keep the button busy
// meanwhile. One place, so every form answers alike.
import type { ZodError } from 'zod'

interface Schema<Out> {
  safeParse(value: unknown): { success: true, data: Out } | { success: false, error: ZodError }
}

interface Options {
  /** Rewords the field messages (e.g. "Choose accepted, rejected or waived" for a missing choice). */
  messages?: (fields: Record<string, string>) => Record<string, string>
  /** Sees a refused request before its message is shown (e.g. a 410 for an expired link). */
  onError?: (e: unknown) => void
}

export function useFormSubmit<Out, Created>(schema: Schema<Out>, send: (data: Out) => Promise<Created>, failMessage: string, opts: Options = {}) {
  const errors = ref<Record<string, string>>({})
  const formError = ref('')
  const busy = ref(false)

  /** The answer, or undefined when the values or the request were refused (the reason is shown). */
  async function submit(values: unknown): Promise<Created | undefined> {
    formError.value = ''
    const parsed = schema.safeParse(values)
    if (!parsed.success) {
      const fields = fieldErrors(parsed.error)
      errors.value = opts.messages ? opts.messages(fields) : fields
      return undefined
    }
    errors.value = {}
    busy.value = true
    try {
      return await send(parsed.data)
    } catch (e) {
      opts.onError?.(e)
      formError.value = errorMessage(e, failMessage)
      return undefined
    } finally {
      busy.value = false
    }
  }

  return { errors, formError, busy, submit }
}

/** Runs a request that has no values to check (clearing a decision) with the same busy state and message. */
export async function runSubmit<T>(state: { formError: Ref<string>, busy: Ref<boolean> }, send: () => Promise<T>, failMessage: string): Promise<T | undefined> {
  state.formError.value = ''
  state.busy.value = true
  try {
    return await send()
  } catch (e) {
    state.formError.value = errorMessage(e, failMessage)
    return undefined
  } finally {
    state.busy.value = false
  }
}
