import type { UploadLimit } from '#shared/utils/catalogueSchemas'

export interface UploadAnswerBody {
  message?: string
  data?: { fields?: Record<string, string> }
  [key: string]: unknown
}

/** A refused or lost upload, shaped like a `$fetch` error so useFormErrors / useFormSubmit read it the same way. */
export interface UploadRefusal {
  statusCode: number
  data: UploadAnswerBody
}

export type UploadPhase = 'idle' | 'uploading' | 'processing' | 'done' | 'failed'

/** A file size as people read it: kB under a megabyte, MB with one decimal above. */
export function formatFileSize(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} kB`
}

/**
 * One multipart upload with progress: `send` POSTs with XMLHttpRequest (the one browser API that
 * reports upload progress; the browser adds the cookie and Origin itself), refuses a file over the
 * limit before anything is sent, and `cancel` stops it. A refusal, the server's or ours, rejects with
 * an UploadRefusal carrying the message and the server's field errors.
 */
export function useUpload(limit?: MaybeRefOrGetter<UploadLimit | undefined>) {
  const progress = reactive({ phase: 'idle' as UploadPhase, name: '', loaded: 0, total: 0, message: '' })
  const percent = computed(() => (progress.total > 0 ? Math.round((progress.loaded / progress.total) * 100) : 0))
  const active = computed(() => progress.phase === 'uploading' || progress.phase === 'processing')
  let request: XMLHttpRequest | null = null

  /** Why this file is too large to send, or undefined when it is within the limit. */
  function tooLarge(file: File): string | undefined {
    const max = toValue(limit)
    return max && file.size > max.maxBytes ? `${file.name} is ${formatFileSize(file.size)}: larger than ${max.label}` : undefined
  }

  function refuse(statusCode: number, data: UploadAnswerBody): never {
    progress.phase = 'failed'
    progress.message = data.message ?? `The upload was refused (${statusCode}).`
    throw { statusCode, data: { ...data, message: progress.message } } satisfies UploadRefusal
  }

  async function send<T>(url: string, body: FormData, file?: File): Promise<T> {
    progress.name = file?.name ?? ''
    progress.loaded = 0
    progress.total = file?.size ?? 0
    progress.message = ''
    const large = file && tooLarge(file)
    if (large) refuse(413, { message: large, data: { fields: { file: large } } })
    progress.phase = 'uploading'
    const answer = await new Promise<{ status: number, body: UploadAnswerBody | null }>((resolve, reject) => {
      const xhr = new XMLHttpRequest()
      request = xhr
      xhr.open('POST', url)
      xhr.responseType = 'json'
      xhr.setRequestHeader('Accept', 'application/json')
      xhr.upload.addEventListener('progress', (event) => {
        if (!event.lengthComputable) return
        progress.loaded = event.loaded
        progress.total = event.total
      })
      xhr.upload.addEventListener('load', () => {
        progress.loaded = progress.total
        progress.phase = 'processing'
      })
      xhr.addEventListener('load', () => resolve({ status: xhr.status, body: xhr.response ?? null }))
      xhr.addEventListener('error', () => reject({ statusCode: 0, data: { message: 'The upload did not reach the server; check the connection and try again.' } }))
      xhr.addEventListener('abort', () => reject({ statusCode: 0, data: { message: 'The upload was cancelled.' } }))
      xhr.send(body)
    }).catch((refusal: UploadRefusal) => refuse(refusal.statusCode, refusal.data))
      .finally(() => {
        request = null
      })
    if (answer.status < 200 || answer.status >= 300) refuse(answer.status, answer.body ?? {})
    progress.loaded = progress.total
    progress.phase = 'done'
    return answer.body as T
  }

  /** Stops the upload under way; `send` then rejects with "The upload was cancelled." */
  function cancel() {
    request?.abort()
  }

  function reset() {
    cancel()
    progress.phase = 'idle'
    progress.message = ''
  }

  return { progress, percent, active, tooLarge, send, cancel, reset }
}

export type Upload = ReturnType<typeof useUpload>

/** The usual status line of an upload that the server analyses: progress, then the done message or the refusal. */
export function uploadStatus(upload: Upload, what: string, done: string): string {
  switch (upload.progress.phase) {
    case 'uploading': return `Uploading ${what}: ${upload.percent.value} %`
    case 'processing': return `Uploaded; the server is analysing ${what}…`
    case 'done': return done
    case 'failed': return upload.progress.message
    default: return ''
  }
}
