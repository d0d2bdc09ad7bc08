/** The way a field is typed, which sets its keypad on a phone and its kind of input. */
export type FieldKind = 'text' | 'length' | 'decimal' | 'whole' | 'date' | 'email' | 'password' | 'select' | 'textarea'

export interface FieldOption { value: string, label: string }

/** One choice of a `<UiFilterBar>`, kept in the URL's query under `name`; `fallback` shows when it is not there. */
export interface QueryFilter { name: string, label: string, id: string, options: FieldOption[], fallback?: string }

/**
 * One field of a form, as data: `<UiFieldGrid>` draws a list of them with their labels, hints and the
 * server's message for each. `key` is the form's own name for the value; `name` (the same unless given)
 * is the field's name in the request, which the server's messages use.
 */
export interface FieldSpec {
  key: string
  name?: string
  /** The name the server's message for it comes under, where that is not `name` (e.g. price → priceMinor). */
  errorName?: string
  label: string
  hint?: string
  required?: boolean
  /** 'length' takes fractions and units (7/16, 4.8 mm), so a text keypad: the decimal one has no slash. */
  kind?: FieldKind
  autocomplete?: string
  /** For a select: its choices, or groups of them. */
  options?: FieldOption[]
  groups?: { label: string, options: FieldOption[] }[]
  id?: string
  rows?: number
  /** Spans the whole row of a grid. */
  wide?: boolean
  placeholder?: string
  disabled?: boolean
}

const inputModes: Partial<Record<FieldKind, 'text' | 'decimal' | 'numeric' | 'email'>> = {
  length: 'text',
  decimal: 'decimal',
  whole: 'numeric',
}
const inputTypes: Partial<Record<FieldKind, string>> = { date: 'date', email: 'email', password: 'password' }

/** The input attributes a field's kind stands for. */
export const fieldInputMode = (kind: FieldKind = 'text') => inputModes[kind]
export const fieldInputType = (kind: FieldKind = 'text') => inputTypes[kind] ?? 'text'

/** What a field hands its `<UiFieldFrame>`: the label, and the hint or the server's message below it. */
export const frameOf = (field: { label: string, hint?: string, error?: string, required?: boolean }) =>
  ({ label: field.label, hint: field.hint, error: field.error, required: field.required })

/** A typed value for a request: trimmed, and left out when empty so the server's default applies. */
export const typedOrUndefined = (value: string) => (value.trim() === '' ? undefined : value.trim())

/** Every value of a form, each typed or left out (see `typedOrUndefined`). */
export const typedValues = <T extends Record<string, string>>(values: T) =>
  Object.fromEntries(Object.entries(values).map(([key, value]) => [key, typedOrUndefined(value)])) as { [K in keyof T]?: string }
