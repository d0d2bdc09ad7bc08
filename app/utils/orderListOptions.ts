/** The orders list's sort choices, as the server's `sort` values with their labels (the first is the default). */
export const orderSortOptions = [
  { value: 'newest', label: 'Newest first' },
  { value: 'oldest', label: 'Oldest first' },
  { value: 'total_desc', label: 'Largest total' },
  { value: 'total_asc', label: 'Smallest total' },
] as const
