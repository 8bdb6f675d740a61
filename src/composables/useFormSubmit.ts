import { ref } from 'vue'
import { ApiError, messageOf } from '@/api/http'

/**
 * Runs a form's request and keeps what the form must draw: a busy flag, the server's message,
 * and per-field messages from a 422 (or a 409 that names a field).
 */
export function useFormSubmit() {
  const submitting = ref(false)
  const formError = ref<string | null>(null)
  const fieldErrors = ref<Record<string, string>>({})

  function reset(): void {
    formError.value = null
    fieldErrors.value = {}
  }

  /** Returns the request's result, or undefined when it failed (the error is then on the form). */
  async function submit<T>(run: () => Promise<T>): Promise<T | undefined> {
    if (submitting.value) return undefined
    submitting.value = true
    reset()
    try {
      return await run()
    } catch (error) {
      const fields = error instanceof ApiError ? error.fields : {}
      fieldErrors.value = fields
      // With field messages the form already says what is wrong; the summary line is only for the rest.
      formError.value = Object.keys(fields).length > 0 ? null : messageOf(error)
      return undefined
    } finally {
      submitting.value = false
    }
  }

  return { submitting, formError, fieldErrors, submit, reset }
}

/** "New password must be at least 10 characters." from the label and the server's field message. */
export function fieldFeedback(label: string, message: string | undefined): string | undefined {
  if (!message) return undefined
  // A message that is an instruction ("choose a campaign") is a sentence of its own.
  if (!/^(is|are|must|has|have|was|were|does|do|can|cannot|should|needs?|may)\b/i.test(message)) {
    const own = message.charAt(0).toUpperCase() + message.slice(1)
    return /[.!?]$/.test(own) ? own : `${own}.`
  }
  // "is not an e-mail address" under "E-mail address" reads better as "This is not an e-mail address."
  const subject = message.toLowerCase().includes(label.toLowerCase()) ? 'This' : label
  const sentence = `${subject} ${message}`
  return /[.!?]$/.test(sentence) ? sentence : `${sentence}.`
}
