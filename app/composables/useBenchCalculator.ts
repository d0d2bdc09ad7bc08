/**
 * One bench calculator: `calculate` asks the server for the answer through `useFormSubmit`, so a wrong
 * figure is named on its own field and a refusal clears the old answer rather than leaving it standing.
 * `opening` is the answer shown before the first calculation, if any.
 */
export function useBenchCalculator<T>(ask: () => Promise<T>, opening?: T) {
  const { busy, errors, submit } = useFormSubmit()
  const answer = shallowRef<T | undefined>(opening)

  async function calculate() {
    await submit(async () => {
      answer.value = await ask()
    }, { failed: () => {
      answer.value = undefined
    } })
  }

  return { busy, errors, answer, calculate }
}
