import type { FieldSpec } from '~/utils/formFields'

// The fields of signing in and of a new account, shared by the pages that ask for them.
export const emailInput: FieldSpec = { key: 'email', label: 'E-mail', kind: 'email', autocomplete: 'email', required: true }

export const newPasswordInput: FieldSpec = { key: 'password', label: 'New password', kind: 'password', autocomplete: 'new-password', hint: 'At least 8 characters.', required: true }

/** Name, e-mail and a new password: a new account (registration, and the shop's first maker at /setup). */
export const newAccountFields: FieldSpec[] = [
  { key: 'name', label: 'Your name', autocomplete: 'name', required: true },
  emailInput,
  { ...newPasswordInput, label: 'Password', hint: 'At least 8 characters; a few words strung together work well.' },
]
