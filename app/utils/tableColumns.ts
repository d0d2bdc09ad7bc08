import type { RouteLocationRaw } from 'vue-router'

/**
 * One column of a `<UiDataTable>`: its heading, the row's value under `key` (or its `text`, and a
 * `detail` line under it) unless the table's caller fills the cell through a slot of that name, and how
 * the cell is set.
 */
export interface TableColumn<Row = never> {
  key: string
  label: string
  /** The heading is read by screen readers only (e.g. a column of buttons). */
  hiddenLabel?: boolean
  /** Figures: set to the right. */
  numeric?: boolean
  /** The cell that names the row (a `<th scope="row">`). */
  rowHeader?: boolean
  /** Classes of this column's cells beyond the usual padding (e.g. `whitespace-nowrap`). */
  cellClass?: string
  /** Classes of this column's heading and cells both (e.g. a shaded column). */
  tint?: string
  /** Left out of a stacked row at phone width (`<UiDataTable stack>`): the row's own page shows it. */
  stackHidden?: boolean
  /** The cell's text, where it is not the value as it stands (a date, a sum of money…). */
  text?(row: Row): string | number
  /** A quieter line under the text (the other unit, an e-mail under a name), left out when empty. */
  detail?(row: Row): string | undefined
  /** The detail line's colour where it is a warning rather than a quieter word (default: muted). */
  detailClass?: string
  /** Where the cell's text leads (the row's own page), or nothing for plain text. */
  link?(row: Row): RouteLocationRaw | undefined
}
