import type { FieldOption, FieldSpec } from '~/utils/formFields'

type CheckoutFieldName = 'email' | 'name' | 'line1' | 'line2' | 'postalCode' | 'city' | 'region' | 'country'

/**
 * The checkout form's fields, in the order they are shown (`<UiFieldGrid>`): the first four across the
 * whole row, the rest two a row from tablet width. The country is a choice of every country by name.
 */
export function checkoutFields(): (FieldSpec & { key: CheckoutFieldName })[] {
  return [
    { key: 'email', label: 'E-mail', kind: 'email', autocomplete: 'email', required: true, wide: true },
    { key: 'name', label: 'Name', autocomplete: 'name', required: true, wide: true },
    { key: 'line1', label: 'Address', autocomplete: 'address-line1', required: true, wide: true },
    { key: 'line2', label: 'Address, second line', autocomplete: 'address-line2', wide: true },
    { key: 'postalCode', label: 'Postal code', autocomplete: 'postal-code', required: true },
    { key: 'city', label: 'Town or city', autocomplete: 'address-level2', required: true },
    { key: 'region', label: 'State or region', autocomplete: 'address-level1' },
    { key: 'country', label: 'Country', kind: 'select', autocomplete: 'country', required: true, options: countryOptions() },
  ]
}

let countries: FieldOption[] | undefined
/** Every country by its English name, valued by its ISO 3166-1 code; the shop's zone and tax follow from it. */
export function countryOptions(): FieldOption[] {
  countries ??= [
    { value: '', label: 'Choose a country' },
    ...countryCodes.map(code => ({ value: code, label: countryName(code) })).sort((a, b) => a.label.localeCompare(b.label, 'en')),
  ]
  return countries
}

export type CheckoutForm = Record<CheckoutFieldName, string>
