/**
 * One column of a `<UiDataTable>`: its heading, the row's value under `key` unless the table's caller
 * fills the cell through a slot of that name, and how the cell is set.
 */
export interface TableColumn {
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
}
