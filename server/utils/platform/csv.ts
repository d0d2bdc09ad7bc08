import { create as contentDisposition } from 'content-disposition'
import { stringify } from 'csv-stringify/sync'
import type { H3Event } from 'h3'

/**
 * A cell as text, defused if a spreadsheet would run it as a formula: text starting with = + - @, a tab
 * or a carriage return gets a leading apostrophe. A plain negative number (a level in dBFS) is not a formula.
 */
export function csvCellText(value: unknown): string {
  const text = value instanceof Date ? value.toISOString() : String(value ?? '')
  const formulaLike = /^[=+\-@\t\r]/.test(text) && !/^-\d+(\.\d+)?$/.test(text)
  return formulaLike ? `'${text}` : text
}

/**
 * A CSV download (csv-stringify): the header line as plain names, then every cell quoted, lines ending
 * in CRLF, as an attachment named `<name>-<today>.csv`.
 */
export function csvDownload(event: H3Event, name: string, header: string[], rows: unknown[][]): string {
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', contentDisposition(`${name}-${new Date().toISOString().slice(0, 10)}.csv`))
  return stringify([header], { record_delimiter: '\r\n' })
    + stringify(rows.map(row => row.map(csvCellText)), { quoted: true, quoted_empty: true, record_delimiter: '\r\n' })
}
