import type { FieldOption } from '~/utils/formFields'

/** The checkout form's fields, in the order they are shown: the first four one a line, the rest two a line. */
export interface CheckoutField {
  name: 'email' | 'name' | 'line1' | 'line2' | 'postalCode' | 'city' | 'region' | 'country'
  label: string
  autocomplete: string
  type?: string
  required?: boolean
  /** A choice from a list instead of typed text (the country). */
  options?: () => FieldOption[]
}

export const checkoutFieldsWide: CheckoutField[] = [
  { name: 'email', label: 'E-mail', type: 'email', autocomplete: 'email', required: true },
  { name: 'name', label: 'Name', autocomplete: 'name', required: true },
  { name: 'line1', label: 'Address', autocomplete: 'address-line1', required: true },
  { name: 'line2', label: 'Address, second line', autocomplete: 'address-line2' },
]

export const checkoutFieldsPaired: CheckoutField[] = [
  { name: 'postalCode', label: 'Postal code', autocomplete: 'postal-code', required: true },
  { name: 'city', label: 'Town or city', autocomplete: 'address-level2', required: true },
  { name: 'region', label: 'State or region', autocomplete: 'address-level1' },
  { name: 'country', label: 'Country', autocomplete: 'country', required: true, options: countryOptions },
]

let countries: FieldOption[] | undefined
/** Every country by its English name, valued by its ISO 3166-1 code; the shop's zone and tax follow from it. */
export function countryOptions(): FieldOption[] {
  countries ??= [
    { value: '', label: 'Choose a country' },
    ...countryCodes.map(code => ({ value: code, label: countryName(code) })).sort((a, b) => a.label.localeCompare(b.label, 'en')),
  ]
  return countries
}

export type CheckoutForm = Record<CheckoutField['name'], string>
