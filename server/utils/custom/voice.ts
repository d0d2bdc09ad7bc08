import type { H3Event } from 'h3'

/**
 * A customer's own recording for a personal message (voice `upload`): WAV, MP3 or Ogg by its content,
 * within the audio upload limit (the declared size is checked before the body is read), read through
 * to its end and measured. Kept private under purpose `voice`; the checkout links it to one message.
 */
export async function receiveVoiceUpload(event: H3Event, userId: number | null) {
  const { file } = await readUploadForm(event, 'audio', { required: 'choose your recording (WAV, MP3 or Ogg)' })
  const { taken, found } = await sniffFile(file!.data)
  if (!taken || taken.purpose !== 'audio') {
    throw createError({
      statusCode: 415,
      statusMessage: 'Unsupported Media Type',
      message: `file: only WAV, MP3 or Ogg recordings are taken here; by its content this file is ${found ? `a ${found} file` : 'of a kind we do not take'}, whatever its name says. Nothing was stored.`,
      data: { fields: { file: 'only WAV, MP3 or Ogg' } },
    })
  }
  const { seconds } = checkAudioSample(file!.data, taken.mime)
  if (seconds > VOICE_SECONDS_MAX) throw fieldError('file', `the recording is ${Math.round(seconds)} s long; a message holds at most ${VOICE_SECONDS_MAX} s. Nothing was stored.`)
  const extension = taken.mime === 'audio/wav' ? 'wav' : taken.mime === 'audio/ogg' ? 'ogg' : 'mp3'
  const stored = await storeFile(await useDB(), { data: file!.data, mime: taken.mime, purpose: 'voice', originalName: fileLabel(file!.filename, `voice.${extension}`), isPublic: false, uploadedBy: userId })
  setResponseStatus(event, 201)
  return { id: stored.id, seconds: Math.round(seconds * 100) / 100, mime: stored.mime, bytes: stored.bytes }
}
