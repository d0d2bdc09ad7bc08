import type { LocationQuery } from 'vue-router'

interface QueryFiltersOptions {
  /** A value equal to its default is left out of the address (e.g. visibility "all"). */
  defaults?: Record<string, string>
  /** Replace the history entry instead of adding one. */
  replace?: boolean
}

type Patch = Record<string, string | number | undefined>

/**
 * Filters and page that live in the URL's query, so a filtered list can be bookmarked and shared.
 * `set` merges a change into the query, leaves out empty and default values and starts again at the
 * first page (unless the change names a page); `search` follows `q` for a search box.
 */
export function useQueryFilters(options: QueryFiltersOptions = {}) {
  const route = useRoute()
  const defaults = options.defaults ?? {}
  const query = computed<LocationQuery>(() => route.query)

  /** One filter's value as text: '' (or its default) when it is not in the address. */
  function value(name: string): string {
    const entry = route.query[name]
    const text = Array.isArray(entry) ? entry[0] : entry
    return typeof text === 'string' && text !== '' ? text : defaults[name] ?? ''
  }

  const search = ref(value('q'))
  watch(() => route.query.q, () => {
    search.value = value('q')
  })

  function set(patch: Patch) {
    const next: Record<string, string> = {}
    for (const [key, entry] of Object.entries({ ...route.query, page: undefined, ...patch })) {
      if (entry === undefined || entry === null || entry === '') continue
      const text = String(entry)
      if (text !== defaults[key]) next[key] = text
    }
    return navigateTo({ query: next }, { replace: options.replace })
  }

  /** For a <select>'s change: sets the filter `name` to the chosen option. */
  const choose = (name: string, event: Event) => set({ [name]: (event.target as HTMLSelectElement).value })
  /** Runs the search box's text as `q`. */
  const runSearch = () => set({ q: search.value.trim() })

  const currentPage = computed(() => Number(value('page') || 1))
  /** The address of one page of the same list: page 1 is the address without a page. */
  const pageLink = (page: number) => ({ query: { ...route.query, page: page > 1 ? String(page) : undefined } })
  /** Whether anything but the page narrows the list. */
  const filtered = computed(() => Object.keys(route.query).some(key => key !== 'page'))
  /** The query as a query string without the named keys, e.g. for a CSV export of the same filters. */
  const queryString = (...leaveOut: string[]) => new URLSearchParams(Object.entries(route.query)
    .filter(([key]) => !leaveOut.includes(key))
    .map(([key, entry]) => [key, String(entry)])).toString()

  return { query, value, search, set, choose, runSearch, currentPage, pageLink, filtered, queryString }
}
