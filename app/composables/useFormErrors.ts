/** Turns an API error into a message and per-field messages, so each input can show its own. */
export function useFormErrors() {
  const fields = ref<Record<string, string>>({})
  const message = ref('')

  function clear() {
    fields.value = {}
    message.value = ''
  }

  /** Marks fields found wrong before anything was sent, with the same summary as the server's refusal. */
  function refuse(found: Record<string, string>) {
    fields.value = found
    message.value = 'Please correct the marked fields.'
  }

  function take(error: unknown) {
    const body = (error as { data?: { message?: string, data?: { fields?: Record<string, string> } } })?.data
    fields.value = body?.data?.fields ?? {}
    // When fields carry their own messages, the summary only points at them (no message read twice).
    message.value = Object.keys(fields.value).length > 0
      ? 'Please correct the marked fields.'
      : body?.message ?? 'Something went wrong; please try again.'
  }

  /** The message for one field, without the field's name in front where the server put it there. */
  function field(name: string): string | undefined {
    const text = fields.value[name]
    return text?.startsWith(`${name}:`) ? text.slice(name.length + 1).trimStart() : text
  }

  return { fields, message, clear, refuse, take, field }
}
