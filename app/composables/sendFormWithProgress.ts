export interface FormAnswerBody {
  message?: string
  data?: { fields?: Record<string, string> }
  [key: string]: unknown
}

export interface FormAnswer {
  status: number
  // The parsed JSON answer (or null), whatever the status: callers decide what a refusal means.
  body: FormAnswerBody | null
}

/**
 * POSTs a multipart form with XMLHttpRequest, the one browser API that reports upload progress. The
 * browser adds the cookie and the Origin header itself, as for any same-site POST. Resolves with the
 * answer for every HTTP status; rejects only when the request never reached the server.
 */
export function sendFormWithProgress(url: string, body: FormData, hooks: { progress?: (loaded: number, total: number) => void, sent?: () => void } = {}): Promise<FormAnswer> {
  return new Promise((resolve, reject) => {
    const request = new XMLHttpRequest()
    request.open('POST', url)
    request.responseType = 'json'
    request.setRequestHeader('Accept', 'application/json')
    request.upload.addEventListener('progress', (event) => {
      if (event.lengthComputable) hooks.progress?.(event.loaded, event.total)
    })
    request.upload.addEventListener('load', () => hooks.sent?.())
    request.addEventListener('load', () => resolve({ status: request.status, body: request.response ?? null }))
    request.addEventListener('error', () => reject(new Error('The upload did not reach the server; check the connection and try again.')))
    request.send(body)
  })
}
