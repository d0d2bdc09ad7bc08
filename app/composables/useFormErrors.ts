/** Turns an API error into a message and per-field messages, so each input can show its own. */
export function useFormErrors() {
  const fields = ref<Record<string, string>>({})
  const message = ref('')

  function clear() {
    fields.value = {}
    message.value = ''
  }

  function take(error: unknown) {
    const body = (error as { data?: { message?: string, data?: { fields?: Record<string, string> } } })?.data
    fields.value = body?.data?.fields ?? {}
    // When fields carry their own messages, the summary only points at them (no message read twice).
    message.value = Object.keys(fields.value).length > 0
      ? 'Please correct the marked fields.'
      : body?.message ?? 'Something went wrong; please try again.'
  }

  return { fields, message, clear, take }
}
