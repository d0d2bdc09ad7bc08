/**
 * The shop's wax formulas (Workshop figures) as select options: what a made catalogue item or a batch
 * is tied to, so that a ticket is offered blanks of the wax its item is made of. The first is the default.
 */
export async function useWaxFormulas() {
  const { data } = await useFetch('/api/workshop/settings/engine', { key: 'engine-settings-wax-formulas', pick: ['settings'] })
  const formulas = computed(() => data.value?.settings.fit.waxFormulas ?? [])
  const options = computed(() => formulas.value.map((formula, index) => ({ value: formula.id, label: index === 0 ? `${formula.label} (the shop's first)` : formula.label })))
  return { formulas, options }
}
