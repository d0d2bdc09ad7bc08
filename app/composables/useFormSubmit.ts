interface SubmitOptions {
  /** Runs after the errors are taken, for a form that must also react to a refusal. */
  failed?: (error: unknown) => unknown
  /** The work ends by leaving the page: the button stays busy on success so it cannot be pressed again. */
  leaving?: boolean
}

/**
 * One form's submit: `busy` while it runs (the button shows it and cannot be pressed twice), the
 * server's errors by field when it fails (useFormErrors), and `done` once it has worked.
 */
export function useFormSubmit() {
  const busy = ref(false)
  const done = ref(false)
  const errors = useFormErrors()

  async function submit(work: () => Promise<unknown>, options: SubmitOptions = {}): Promise<boolean> {
    errors.clear()
    done.value = false
    busy.value = true
    try {
      await work()
      done.value = true
      if (!options.leaving) busy.value = false
      return true
    }
    catch (error) {
      errors.take(error)
      try {
        await options.failed?.(error)
      }
      finally {
        busy.value = false
      }
      return false
    }
  }

  return { busy, done, errors, submit }
}
