import type { FieldSpec } from '~/utils/formFields'

/**
 * A form drawn from field specs: its values, its fields (a list, or a getter for fields that come and
 * go), and its submit (useFormSubmit: busy, the server's errors by field, done). Hand it to `<UiForm :form>`.
 */
export function useFieldForm<T extends Record<string, string>>(values: T, fields: MaybeRefOrGetter<FieldSpec[]>) {
  return { values, fields: computed(() => toValue(fields)), ...useFormSubmit() }
}

export type FieldForm = ReturnType<typeof useFieldForm>

/**
 * What `<UiForm :form>` reads: a submit's busy state and errors (useFormSubmit, useBenchCalculator…)
 * and, from useFieldForm, the values and fields it then draws.
 */
export interface FormState {
  busy: Ref<boolean>
  errors: ReturnType<typeof useFormErrors>
  values?: Record<string, string>
  fields?: ComputedRef<FieldSpec[]>
}
