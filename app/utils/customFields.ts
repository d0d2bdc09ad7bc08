import { cylinderFormatTable, cylinderFormats, cylinderSpeedsRpm, standardCylinderRpm } from '#shared/utils/cylinder'
import type { CustomForm } from '~/composables/useCustomMessage'
import type { FieldOption } from '~/utils/formFields'
import { ticketDay } from '~/utils/ticketFormat'

// The words and choices of the personal-message form, as data: its components draw them.

/** Suggestions for the occasion; the customer may type any other. */
export const customOccasions = ['Birthday', 'Wedding', 'Anniversary', 'Retirement', 'A letter to the future', 'Thank you', 'In memory']

/** Who speaks on the record. */
export const customVoiceOptions: { value: CustomForm['voice'], label: string }[] = [
  { value: 'maker', label: 'The maker reads your script into the horn' },
  { value: 'upload', label: 'Your own recording, played into the horn by the maker' },
]

export const customFormatOptions: FieldOption[] = cylinderFormats.map(format => ({ value: format, label: cylinderFormatTable[format].label }))

export const customSpeedOptions: FieldOption[] = cylinderSpeedsRpm.map(rpm => ({ value: String(rpm), label: `${rpm} rpm${rpm === standardCylinderRpm ? ' (standard)' : ''}` }))

/** What each field says under it until the server has something to say about it. */
export const customHints = {
  occasion: 'A birthday, a wedding toast, a letter to the future…',
  rpm: 'Slower turns play longer: choose the speed your machine plays at.',
  wishedDate: 'The earliest date follows from the workshop\'s lead time.',
  rush: 'Made ahead of the queue for an earlier date, at a charge.',
  notes: 'How a name is said, the tone you hope for, a pause you want. Optional.',
  script: 'Words are counted as they are said aloud: "1905" is three words, "50%" two. The meter shows how long it runs.',
  scriptOfRecording: 'The length on the record is your recording\'s own.',
} as const

/** The earliest day a message can be sent, as the date field's hint, in the shop's locale (`useUnits().prefs`). */
export const customEarliestHint = (earliestDate: string | undefined, locale: string) =>
  earliestDate ? `The earliest we can send it: ${ticketDay(earliestDate, locale)}.` : customHints.wishedDate
