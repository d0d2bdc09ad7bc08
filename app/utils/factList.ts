/**
 * One line of a definition list (`<UiFactList>`): a term, its value, and an optional hint under the value.
 * `key` keys the line (the term otherwise) and names the slot that can render a richer value.
 */
export interface FactItem {
  term: string
  value?: string | number | null
  hint?: string
  key?: string
  /** Classes of the whole line: its row in the `rows` layout, or both its term and value in the `grid` layout. */
  class?: string
  /** Classes of the value alone (a fixed-width face for codes, a colour for a warning). */
  valueClass?: string
  /** A test id on the value. */
  testid?: string
}

/** A value with nothing in it: null, undefined or an empty text. */
export const isEmptyFact = (item: FactItem) => item.value === null || item.value === undefined || item.value === ''
