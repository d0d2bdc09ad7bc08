import type { EngineSettings } from '#shared/utils/engineSettings'
import type { UnitPreferences } from '#shared/utils/units'
import { editedFigure, isEditedFigure, typedWithUnit } from '~/composables/useUnits'
import { engineFigureSections, type FigureKind, type FigureRows } from '~/utils/engineFigureSections'

export type FigureCell = string | boolean

function read(source: unknown, path: string): unknown {
  return path.split('.').reduce<unknown>((value, key) => (value as Record<string, unknown> | undefined)?.[key], source)
}
function write(target: Record<string, unknown>, path: string, value: unknown) {
  const keys = path.split('.')
  let node = target
  for (const key of keys.slice(0, -1)) node = (node[key] ??= {}) as Record<string, unknown>
  node[keys.at(-1)!] = value
}

/** Decimals of a currency's minor unit (2 for USD, 0 for JPY); 2 when the code is not one. */
function minorDigits(currency: string): number {
  try {
    return new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions().maximumFractionDigits ?? 2
  }
  catch {
    return 2
  }
}

function show(value: unknown, kind: FigureKind, digits: number, prefs: UnitPreferences): FigureCell {
  if (kind === 'bool') return Boolean(value)
  if (isEditedFigure(kind) && typeof value === 'number') return editedFigure(value, kind, prefs)
  if (kind === 'money' && typeof value === 'number') return (value / 10 ** digits).toFixed(digits)
  // A length on the 1/64 in rule reads as the maker says it (7/16, 1 3/16); others as decimals.
  if (kind === 'length' && typeof value === 'number' && !Number.isInteger(value) && isWholeSixtyFourth(value)) return formatInchFraction(value)
  if (typeof value === 'number') return String(Number(value.toPrecision(12)))
  return value === undefined || value === null ? '' : String(value)
}

/** What the server gets: numbers where the text is one (a typographic minus or decimal comma accepted), else the text, for the server to name. */
function parse(cell: FigureCell, kind: FigureKind, digits: number, prefs: UnitPreferences): unknown {
  if (kind === 'bool') return Boolean(cell)
  const text = String(cell).trim()
  if (isEditedFigure(kind)) return typedWithUnit(text, kind, prefs)
  if (kind === 'text' || kind === 'length') return text
  const cleaned = text.replace('−', '-').replace(',', '.')
  if (cleaned === '' || !Number.isFinite(Number(cleaned))) return text
  return kind === 'money' ? Math.round(Number(cleaned) * 10 ** digits) : Number(cleaned)
}

/**
 * The workshop figures form over the `engine` setting: the fields and lists as text the maker edits,
 * filled from the stored figures (or the shop defaults), and sent whole; the server validates it (zod)
 * and names each bad field by its path, which is also each input's name.
 */
export async function useEngineFigures() {
  const sections = engineFigureSections
  // The request is awaited at the end: the watcher and the form are set up while the page's context holds.
  const request = useFetch<{ settings: EngineSettings, defaults: EngineSettings }>('/api/workshop/settings/engine', { key: 'settings-engine' })
  const { data, refresh } = request

  const { prefs } = useUnits()

  const values = reactive<Record<string, FigureCell>>({})
  const rows = reactive<Record<string, Record<string, FigureCell>[]>>({})
  // A figure converted into the shop's unit and left as shown is sent as stored, so saving moves nothing by rounding.
  const storedOf = new Map<string, { shown: FigureCell, stored: unknown }>()
  const storedRows = new WeakMap<object, Map<string, { shown: FigureCell, stored: unknown }>>()

  function shown(stored: unknown, kind: FigureKind, digits: number, memo: Map<string, { shown: FigureCell, stored: unknown }>, path: string): FigureCell {
    const cell = show(stored, kind, digits, prefs.value)
    if (isEditedFigure(kind)) memo.set(path, { shown: cell, stored })
    return cell
  }

  function fill(settings: EngineSettings) {
    const digits = minorDigits(settings.prices.currency)
    storedOf.clear()
    for (const section of sections) {
      for (const field of section.fields) values[field.path] = shown(read(settings, field.path), field.kind, digits, storedOf, field.path)
      for (const list of section.rows ?? []) {
        const items = (read(settings, list.path) as unknown[]) ?? []
        rows[list.path] = items.map((item) => {
          const memo = new Map<string, { shown: FigureCell, stored: unknown }>()
          const row = Object.fromEntries(list.columns.map(column => [column.path, shown(read(item, column.path), column.kind, digits, memo, column.path)]))
          storedRows.set(row, memo)
          return row
        })
      }
    }
  }

  function sent(cell: FigureCell, kind: FigureKind, digits: number, memo: Map<string, { shown: FigureCell, stored: unknown }> | undefined, path: string): unknown {
    const first = memo?.get(path)
    return first && first.shown === cell ? first.stored : parse(cell, kind, digits, prefs.value)
  }
  watchEffect(() => {
    if (data.value) fill(data.value.settings)
  })

  function body(): Record<string, unknown> {
    const digits = minorDigits(String(values['prices.currency'] ?? 'USD'))
    const out: Record<string, unknown> = {}
    for (const section of sections) {
      for (const field of section.fields) write(out, field.path, sent(values[field.path] ?? '', field.kind, digits, storedOf, field.path))
      for (const list of section.rows ?? []) {
        write(out, list.path, (rows[list.path] ?? []).map((row) => {
          const item: Record<string, unknown> = {}
          // A reactive row is a proxy: its raw object is the key its first figures were kept under.
          const memo = storedRows.get(toRaw(row))
          for (const column of list.columns) write(item, column.path, sent(row[column.path] ?? '', column.kind, digits, memo, column.path))
          return item
        }))
      }
    }
    return out
  }

  const { busy, done: saved, errors, submit } = useFormSubmit()

  async function save() {
    const ok = await submit(async () => {
      await $fetch('/api/workshop/settings/engine', { method: 'PUT', body: body() })
    })
    if (ok) await refresh()
  }

  function useDefaults() {
    if (data.value) fill(data.value.defaults)
    saved.value = false
  }

  function addRow(list: FigureRows) {
    (rows[list.path] ??= []).push(list.blank() as Record<string, FigureCell>)
  }
  function removeRow(list: FigureRows, index: number) {
    rows[list.path]!.splice(index, 1)
  }

  await request
  return { sections, values, rows, busy, saved, errors, save, useDefaults, addRow, removeRow }
}
