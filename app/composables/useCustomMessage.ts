import type { UploadLimit } from '#shared/utils/catalogueSchemas'
import { standardCylinderRpm, type CylinderFormat } from '#shared/utils/cylinder'
import type { CartMessage } from '~/stores/cart'

export type FitVerdict = 'fits' | 'tight' | 'too_long'

/** The answer of `POST /api/custom/quote`: the fit, the price by parts, the earliest date and what stops an order. */
export interface CustomQuote {
  fit: { words: number, seconds: number, capacitySeconds: number, verdict: FitVerdict, wordsLeft: number }
  price: { currency: string, parts: { id: string, label: string, amountMinor: number }[], totalMinor: number }
  earliestDate: string
  canOrder: boolean
  reasons: { field: string, message: string }[]
}

/** The customer's own recording once the server has taken and measured it. */
export interface VoiceFile { id: string, seconds: number, mime: string, bytes: number, name: string }

export interface CustomForm {
  occasion: string
  recipientName: string
  script: string
  voice: 'maker' | 'upload'
  format: CylinderFormat
  rpm: number
  wishedDate: string
  rush: boolean
  notes: string
}

/** WAV, MP3 or OGG up to 30 MB; the server decides the type by the content. */
export const customVoiceLimit: UploadLimit = { maxBytes: 30 * 1024 * 1024, label: '30 MB', types: 'audio/wav,audio/x-wav,audio/mpeg,audio/ogg,.wav,.mp3,.ogg' }

/** Seconds as a clock reads them: 75 → "1:15". */
export function messageClock(seconds: number): string {
  const whole = Math.max(0, Math.round(seconds))
  return `${Math.floor(whole / 60)}:${String(whole % 60).padStart(2, '0')}`
}

/** A reason as the server words it ("the earliest date…") as a sentence on its own. */
export function asSentence(text: string): string {
  const trimmed = text.trim()
  return `${trimmed.charAt(0).toUpperCase()}${trimmed.slice(1)}${/[.!?]$/.test(trimmed) ? '' : '.'}`
}

/** What the quote is asked for these choices. */
export function customQuoteBody(form: CustomForm, voice: VoiceFile | null) {
  return {
    script: form.script.trim() === '' ? undefined : form.script,
    voiceSeconds: form.voice === 'upload' ? voice?.seconds : undefined,
    format: form.format,
    rpm: form.rpm,
    voice: form.voice,
    rush: form.rush,
    wishedDate: form.wishedDate || undefined,
  }
}

/** The cart's messages as checkout takes them (`customMessages`), or nothing when there are none. */
export function customMessagesBody(messages: CartMessage[]) {
  if (messages.length === 0) return {}
  return {
    customMessages: messages.map(message => ({
      occasion: message.occasion,
      recipientName: message.recipientName,
      script: message.script,
      voice: message.voice,
      voiceUploadId: message.voice === 'upload' ? message.voiceUploadId : undefined,
      format: message.format,
      rpm: message.rpm,
      rush: message.rush,
      wishedDate: message.wishedDate,
      notes: message.notes || undefined,
    })),
  }
}

/**
 * The /custom page: the message's form, a quote asked again 250 ms after the last change (an older
 * answer arriving late is dropped), the upload of the customer's own recording, and adding to the cart.
 */
export function useCustomMessage() {
  const cart = useCartStore()
  const form = reactive<CustomForm>({ occasion: '', recipientName: '', script: '', voice: 'maker', format: 'two_minute', rpm: standardCylinderRpm, wishedDate: '', rush: false, notes: '' })
  const voiceFile = ref<VoiceFile | null>(null)
  const quote = ref<CustomQuote | null>(null)
  const quoting = ref(false)
  const quoteErrors = useFormErrors()
  const checks = useFormErrors()
  const upload = useUpload(customVoiceLimit)
  const added = ref('')

  let timer: ReturnType<typeof setTimeout> | undefined
  let asked = 0
  async function requestQuote() {
    const sequence = ++asked
    quoting.value = true
    try {
      const answer = await $fetch<CustomQuote>('/api/custom/quote', { method: 'POST', body: customQuoteBody(form, voiceFile.value) })
      if (sequence !== asked) return
      quote.value = answer
      quoteErrors.clear()
      if (!form.wishedDate) form.wishedDate = answer.earliestDate
    }
    catch (error) {
      if (sequence !== asked) return
      quote.value = null
      quoteErrors.take(error)
    }
    finally {
      if (sequence === asked) quoting.value = false
    }
  }
  function schedule() {
    added.value = ''
    clearTimeout(timer)
    timer = setTimeout(requestQuote, 250)
  }
  watch(() => JSON.stringify(customQuoteBody(form, voiceFile.value)), schedule)
  onMounted(requestQuote)
  onBeforeUnmount(() => clearTimeout(timer))

  async function uploadVoice(file: File) {
    voiceFile.value = null
    const body = new FormData()
    body.append('file', file)
    try {
      const answer = await upload.send<Omit<VoiceFile, 'name'>>('/api/custom/voice', body, file)
      voiceFile.value = { ...answer, name: file.name }
    }
    catch { /* the refusal's message is on the upload's status line */ }
  }

  /** A field's message: the server's refusal of the quote, a reason it cannot be made, or a check before adding. */
  function fieldMessage(name: string): string | undefined {
    // "Write the script" is the meter's to say while the box is still empty, not a red field.
    const untouched = (name === 'script' && !form.script.trim()) || (name === 'voiceSeconds' && !voiceFile.value)
    const reason = untouched ? undefined : quote.value?.reasons.find(candidate => candidate.field === name)?.message
    return checks.field(name) ?? quoteErrors.field(name) ?? (reason && asSentence(reason))
  }

  const ready = computed(() => Boolean(quote.value?.canOrder) && !quoting.value && (form.voice === 'maker' || voiceFile.value !== null))

  function addToCart() {
    checks.clear()
    const missing: Record<string, string> = {}
    if (!form.occasion.trim()) missing.occasion = 'Say what the occasion is.'
    if (!form.recipientName.trim()) missing.recipientName = 'Say who the message is for.'
    if (!form.wishedDate) missing.wishedDate = 'Choose the date you would like it by.'
    if (form.voice === 'maker' && !form.script.trim()) missing.script = 'Write the script for the maker to read.'
    if (Object.keys(missing).length) return checks.refuse(missing)
    if (!ready.value || !quote.value) return
    const { price } = quote.value
    cart.addMessage({
      occasion: form.occasion.trim(), recipientName: form.recipientName.trim(), script: form.script, voice: form.voice,
      voiceUploadId: voiceFile.value?.id, voiceName: voiceFile.value?.name, voiceSeconds: voiceFile.value?.seconds,
      format: form.format, rpm: form.rpm, rush: form.rush, wishedDate: form.wishedDate, notes: form.notes.trim() || undefined,
      currency: price.currency, priceParts: price.parts, totalMinor: price.totalMinor,
    })
    added.value = `The message for ${form.recipientName.trim()} is in your cart.`
  }

  return { form, voiceFile, quote, quoting, quoteErrors, checks, upload, uploadVoice, fieldMessage, ready, addToCart, added }
}

export type CustomMessageState = ReturnType<typeof useCustomMessage>
