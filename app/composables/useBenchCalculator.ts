import type { LengthUnit } from '#shared/utils/units'

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

/**
 * The shop's units, waited for: a calculator whose opening figures or unit choice follow them must not
 * start from the defaults while the shop's own setting is still on its way.
 */
export async function useBenchUnits() {
  const units = useUnits()
  if (useNuxtData('shop-units').data.value == null) await refreshNuxtData('shop-units')
  return units
}

/**
 * A typed figure for the server with its unit: text that names one (`11.1 mm`, `2.187"`, `92 °F`, `33C`)
 * goes as typed, a bare figure gets `unit` (the shop's); empty is left out so the server's default applies.
 */
export function withUnit(typed: string, unit: string): string | undefined {
  const text = typed.trim()
  if (text === '') return undefined
  return /[a-z"″”°º]\.?$/i.test(text) ? text : `${text} ${unit}`
}

/** A length typed on a bench form: a bare figure is inches on the server, so a millimetre shop sends `mm`. */
export function typedLength(typed: string, unit: LengthUnit): string | undefined {
  return unit === 'mm' ? withUnit(typed, 'mm') : typedOrUndefined(typed)
}

/**
 * A bench answer's length in the shop's unit first, at the bench's fixed precision (`places` decimals of an
 * inch, one fewer of a millimetre), with the other unit as its detail.
 */
export function benchLength(inches: number, unit: LengthUnit, places = 3): { value: string, detail: string } {
  const inch = `${formatInches(inches, places)} in`
  const mm = `${formatMillimetres(inches, places - 1)} mm`
  return unit === 'mm' ? { value: mm, detail: inch } : { value: inch, detail: mm }
}
