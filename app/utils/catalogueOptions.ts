/** The shop catalogue's filter choices, as its selects show them ('' is "any"). */
export const catalogueKindOptions = [{ value: '', label: 'Everything' }, { value: 'recorded', label: 'Recorded cylinders' }, { value: 'blank', label: 'Blanks' }]
export const catalogueFormatOptions = [{ value: '', label: 'Any format' }, { value: 'two_minute', label: '2-minute (100 per inch)' }, { value: 'four_minute', label: '4-minute (200 per inch)' }]
export const catalogueSortOptions = [{ value: 'title', label: 'Title' }, { value: 'price_asc', label: 'Price, low to high' }, { value: 'price_desc', label: 'Price, high to low' }, { value: 'newest', label: 'Newest' }]
