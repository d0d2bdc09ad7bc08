/**
 * One form's submit: `busy` while it runs (the button shows it and cannot be pressed twice), the
 * server's errors by field when it fails (useFormErrors), and `done` once it has worked.
 */
export function useFormSubmit() {
  const busy = ref(false)
  const done = ref(false)
  const errors = useFormErrors()

  async function submit(work: () => Promise<unknown>): Promise<boolean> {
    errors.clear()
    done.value = false
    busy.value = true
    try {
      await work()
      done.value = true
      return true
    }
    catch (error) {
      errors.take(error)
      return false
    }
    finally {
      busy.value = false
    }
  }

  return { busy, done, errors, submit }
}
