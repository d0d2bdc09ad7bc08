import type { FieldSpec } from '~/utils/formFields'

/**
 * A form of one of the shop's settings drawn from field specs: `save` sends `body()` to `url` by PUT and,
 * once it is stored, runs `after` (fetches again what shows the setting). `saved` holds from then until
 * the next save. Hand it to `<WorkshopSettingsForm :settings>`.
 */
export function useSettingsForm<T extends Record<string, string>>(values: T, fields: FieldSpec[], request: { url: string, body: () => Record<string, unknown>, after: () => Promise<unknown> }) {
  const form = useFieldForm(values, fields)
  async function save() {
    const stored = await form.submit(() => $fetch<unknown>(request.url, { method: 'PUT', body: request.body() }))
    if (stored) await request.after()
  }
  return { form, saved: form.done, busy: form.busy, errors: form.errors, save }
}
