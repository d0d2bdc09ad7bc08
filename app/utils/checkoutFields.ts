/** The checkout form's fields, in the order they are shown: the first four one a line, the rest two a line. */
export interface CheckoutField {
  name: 'email' | 'name' | 'line1' | 'line2' | 'postalCode' | 'city' | 'region' | 'country'
  label: string
  autocomplete: string
  type?: string
  required?: boolean
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
  { name: 'country', label: 'Country', autocomplete: 'country-name', required: true },
]

export type CheckoutForm = Record<CheckoutField['name'], string>
