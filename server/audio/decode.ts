// Decoding an uploaded surface-test WAV.
//
// The RIFF container and the 'fmt ' chunk are parsed by the `wavefile` package. Around it:
//   * Before it: a bounded walk over the top-level chunk headers (the same walk wavefile does:
//     8-byte header, size, pad to even). wavefile trusts the count fields of 'cue ' and 'smpl'
//     chunks, re-walks the file for every 'LIST' it meets and copies a 'junk' chunk into a plain
//     array, so a hostile or damaged upload could make it loop for minutes or eat memory. The walk
//     rejects such files first and also tells a truncated upload from a lying header.
//   * wavefile copies the data chunk with `buffer.slice()`; we hand it a view whose `slice`
//     returns a view, so the samples are never copied.
//   * We do not use wavefile's Float64 `getSamples()` (8 bytes per sample per channel, i.e. 4–8 ×
//     the file size). The result is a reader instead: `readMono(start, count, out)` converts any
//     stretch of frames (stereo averaged to mono, full scale ±1) into a caller's Float32Array, so
//     the analysis streams through the file with one small reusable buffer. Fresh memory is
//     expensive (every new page is a page fault), so this is as much about speed as about size.
import * as wavefileModule from 'wavefile'

export type AudioInputStatus = 400 | 413 | 415 | 422

/**
 * An upload we cannot or will not analyse. `statusCode`: 400 nothing usable was sent (empty);
 * 413 longer than any cylinder plays; 415 not a format we accept (not WAV, compressed, 8-bit,
 * > 2 channels, sample rate out of range); 422 a WAV that is damaged (truncated, sizes that do
 * not add up, no audio data).
 */
export class AudioInputError extends Error {
  readonly statusCode: AudioInputStatus
  readonly code: string
  constructor(statusCode: AudioInputStatus, code: string, message: string) {
    super(message)
    this.name = 'AudioInputError'
    this.statusCode = statusCode
    this.code = code
  }
}

export type WavSampleFormat = 'int' | 'float'

/** Mono samples on demand: frames [start, start + count) into out[0 … count−1], full scale ±1. */
export interface MonoSampleSource {
  sampleRate: number
  frames: number
  readMono(start: number, count: number, out: Float32Array): void
  /**
   * For 16-bit mono PCM: the data chunk's bytes (little-endian, 2 per sample), which the analysis
   * kernel converts itself, faster than readMono.
   */
  pcm16Mono?: Uint8Array
}

export interface DecodedWav extends MonoSampleSource {
  /** Channels in the file; readMono averages stereo to mono. */
  channels: 1 | 2
  bitsPerSample: 16 | 24 | 32
  sampleFormat: WavSampleFormat
  /** The WAVE format tag as written: 1 PCM, 3 IEEE float, 0xFFFE extensible. */
  formatTag: number
  durationS: number
}

export const SURFACE_WAV_LIMITS = {
  minSampleRate: 22050,
  maxSampleRate: 96000,
  /** The longest cylinder (4-minute format at 120 rpm) plays about 6.3 min. */
  maxSeconds: 600,
  maxChunks: 256,
  maxListChunks: 16,
  maxMetadataChunkBytes: 1 << 20,
} as const

const WAVE_FORMAT_PCM = 1
const WAVE_FORMAT_IEEE_FLOAT = 3
const WAVE_FORMAT_EXTENSIBLE = 0xfffe

const CODEC_NAMES: Record<number, string> = {
  2: 'Microsoft ADPCM',
  6: 'A-law',
  7: 'µ-law',
  0x11: 'IMA ADPCM',
  0x31: 'GSM 6.10',
  0x50: 'MPEG',
  0x55: 'MP3',
  0x161: 'Windows Media Audio',
  0x1610: 'AAC',
}

type WaveFileInstance = InstanceType<typeof wavefileModule.WaveFile>
type WaveFileConstructor = new () => WaveFileInstance

// wavefile ships a UMD bundle (main) and ES sources (module); depending on the loader the class is
// a named export or hangs off the CommonJS default export. (Reflect.get, so that bundlers reading
// the ES sources do not warn about a default export those do not have.)
const WaveFile: WaveFileConstructor
  = (wavefileModule as unknown as { WaveFile?: WaveFileConstructor }).WaveFile
    ?? (Reflect.get(wavefileModule, 'default') as { WaveFile: WaveFileConstructor }).WaveFile

interface WaveFmtFields {
  chunkId: string
  chunkSize: number
  audioFormat: number
  numChannels: number
  sampleRate: number
  blockAlign: number
  bitsPerSample: number
  subformat: number[]
}

/** A view of the upload whose slice() is also a view, so wavefile's `buffer.slice()` copies nothing. */
function viewSlicingBytes(input: Uint8Array): Uint8Array {
  const view = new Uint8Array(input.buffer, input.byteOffset, input.byteLength)
  Object.defineProperty(view, 'slice', { value: (start?: number, end?: number) => view.subarray(start, end) })
  return view
}

function fourCC(bytes: Uint8Array, offset: number): string {
  return String.fromCharCode(bytes[offset] ?? 0, bytes[offset + 1] ?? 0, bytes[offset + 2] ?? 0, bytes[offset + 3] ?? 0)
}

function readUint32(bytes: Uint8Array, offset: number): number {
  return ((bytes[offset] ?? 0) | ((bytes[offset + 1] ?? 0) << 8) | ((bytes[offset + 2] ?? 0) << 16) | ((bytes[offset + 3] ?? 0) << 24)) >>> 0
}

/** Say what a non-WAV upload probably is, from its first bytes. */
function describeForeignFile(bytes: Uint8Array): string | null {
  const startsWith = (...values: number[]) => values.every((value, i) => bytes[i] === value)
  if (startsWith(0xff, 0xd8, 0xff)) return 'a JPEG image'
  if (startsWith(0x89, 0x50, 0x4e, 0x47)) return 'a PNG image'
  if (startsWith(0x25, 0x50, 0x44, 0x46)) return 'a PDF document'
  if (startsWith(0x50, 0x4b, 0x03, 0x04)) return 'a ZIP archive'
  if (fourCC(bytes, 0) === 'fLaC') return 'a FLAC file'
  if (fourCC(bytes, 0) === 'OggS') return 'an Ogg (Vorbis/Opus) file'
  if (fourCC(bytes, 0) === 'FORM') return 'an AIFF file'
  if (fourCC(bytes, 4) === 'ftyp') return 'an MP4/M4A file'
  if (startsWith(0x49, 0x44, 0x33) || (bytes[0] === 0xff && ((bytes[1] ?? 0) & 0xe0) === 0xe0)) return 'an MP3 file'
  return null
}

const EXPORT_HINT = 'Export the play-through as an uncompressed PCM WAV (16- or 24-bit, mono or stereo).'

interface ChunkLayout {
  dataOffset: number
  dataSize: number
}

/**
 * Walk the top-level chunks the way wavefile will, with limits, before wavefile sees the file.
 * Throws AudioInputError for truncated files, sizes that do not add up and pathological layouts.
 */
function checkChunkLayout(bytes: Uint8Array): ChunkLayout {
  const length = bytes.length
  const riffSize = readUint32(bytes, 4)
  let offset = 12
  let chunks = 0
  let listChunks = 0
  let data: ChunkLayout | null = null
  let sawFmt = false
  while (offset <= length - 8) {
    chunks++
    if (chunks > SURFACE_WAV_LIMITS.maxChunks) {
      throw new AudioInputError(422, 'too-many-chunks', 'This WAV file is damaged: its header lists an implausible number of sections.')
    }
    const id = fourCC(bytes, offset)
    const size = readUint32(bytes, offset + 4)
    const bodyStart = offset + 8
    const bodyEnd = bodyStart + size
    if (id === 'data') {
      if (data === null) data = { dataOffset: bodyStart, dataSize: size }
      if (bodyEnd > length) {
        throw new AudioInputError(
          422,
          'truncated',
          `This WAV file is cut short: its header promises ${size} bytes of audio but only ${length - bodyStart} arrived. Upload the whole file again.`,
        )
      }
    }
    else {
      if (id === 'fmt ') {
        if (size < 16) throw new AudioInputError(422, 'bad-header', 'This WAV file\'s format section is incomplete.')
        sawFmt = true
      }
      if (bodyEnd > length && data === null) {
        throw new AudioInputError(422, 'truncated', 'This WAV file is cut short: it ends inside its header. Upload the whole file again.')
      }
      if (bodyEnd <= length) {
        const metadataLimited = ['LIST', 'bext', 'iXML', 'junk', '_PMX'].includes(id)
        if (metadataLimited && size > SURFACE_WAV_LIMITS.maxMetadataChunkBytes) {
          throw new AudioInputError(422, 'metadata-too-large', `This WAV file carries an unusually large '${id.trim()}' metadata section; save it again without metadata.`)
        }
        if (id === 'cue ' && (size < 4 || 4 + 24 * readUint32(bytes, bodyStart) > size)) {
          throw new AudioInputError(422, 'bad-header', 'This WAV file is damaged: its cue-point list doesn\'t fit in its own section.')
        }
        if (id === 'smpl' && (size < 36 || 36 + 24 * readUint32(bytes, bodyStart + 28) > size)) {
          throw new AudioInputError(422, 'bad-header', 'This WAV file is damaged: its sampler loop list doesn\'t fit in its own section.')
        }
        if (id === 'LIST') {
          // wavefile re-walks the rest of the file for every LIST it meets, nested ones included.
          listChunks++
          for (let i = bodyStart; i + 4 <= bodyEnd; i++) {
            if (bytes[i] === 0x4c && bytes[i + 1] === 0x49 && bytes[i + 2] === 0x53 && bytes[i + 3] === 0x54) listChunks++
          }
        }
      }
    }
    offset = bodyEnd + (size % 2)
  }
  if (listChunks > SURFACE_WAV_LIMITS.maxListChunks) {
    throw new AudioInputError(422, 'bad-header', 'This WAV file is damaged: it has an implausible number of metadata lists.')
  }
  if (!sawFmt) {
    if (length - 12 < 8) {
      throw new AudioInputError(422, 'truncated', 'This WAV file is cut short: it ends right after its first bytes. Upload the whole file again.')
    }
    throw new AudioInputError(422, 'no-format', 'This WAV file has no format section (\'fmt \'), so its audio can\'t be read.')
  }
  if (data === null) {
    throw new AudioInputError(422, 'no-data', 'This WAV file has no audio section (\'data\'); it may be cut short or not finished by the recorder.')
  }
  const dataEnd = data.dataOffset + data.dataSize
  if (riffSize + 8 < dataEnd) {
    throw new AudioInputError(422, 'bad-header', 'This WAV file\'s header doesn\'t add up: the file size it states is smaller than its audio. Save or export it again.')
  }
  if (riffSize + 8 > length + 1) {
    throw new AudioInputError(
      422,
      'truncated',
      `This WAV file is cut short or its header is wrong: the header states ${riffSize + 8} bytes but the file has ${length}. Upload the whole file again.`,
    )
  }
  return data
}

function checkFormat(fmt: WaveFmtFields): { channels: 1 | 2, bits: 16 | 24 | 32, sampleFormat: WavSampleFormat } {
  let tag = fmt.audioFormat
  if (tag === WAVE_FORMAT_EXTENSIBLE) {
    if (fmt.chunkSize < 40 || fmt.subformat.length < 1) {
      throw new AudioInputError(422, 'bad-header', 'This WAV file\'s format section is incomplete.')
    }
    tag = fmt.subformat[0] ?? 0
  }
  if (tag !== WAVE_FORMAT_PCM && tag !== WAVE_FORMAT_IEEE_FLOAT) {
    const codec = CODEC_NAMES[tag]
    throw new AudioInputError(
      415,
      'compressed',
      `This WAV file is ${codec ? `compressed with ${codec}` : `in an audio encoding we can't read (format ${tag})`}. ${EXPORT_HINT}`,
    )
  }
  const bits = fmt.bitsPerSample
  if (tag === WAVE_FORMAT_PCM && bits === 8) {
    throw new AudioInputError(415, 'eight-bit', `This WAV file is 8-bit, too coarse to measure a quiet surface. ${EXPORT_HINT}`)
  }
  if (tag === WAVE_FORMAT_PCM && bits !== 16 && bits !== 24 && bits !== 32) {
    throw new AudioInputError(415, 'bit-depth', `This WAV file uses ${bits}-bit samples; we read 16-, 24- and 32-bit. ${EXPORT_HINT}`)
  }
  if (tag === WAVE_FORMAT_IEEE_FLOAT && bits !== 32) {
    throw new AudioInputError(415, 'bit-depth', `This WAV file uses ${bits}-bit floating point; we read 32-bit float. ${EXPORT_HINT}`)
  }
  if (fmt.numChannels === 0) {
    throw new AudioInputError(422, 'bad-header', 'This WAV file is damaged: its header says it has no channels.')
  }
  if (fmt.numChannels > 2) {
    throw new AudioInputError(415, 'channels', `This WAV file has ${fmt.numChannels} channels; upload a mono or stereo recording.`)
  }
  const { minSampleRate, maxSampleRate } = SURFACE_WAV_LIMITS
  if (!(fmt.sampleRate >= minSampleRate && fmt.sampleRate <= maxSampleRate)) {
    throw new AudioInputError(
      415,
      'sample-rate',
      `This WAV file is sampled at ${fmt.sampleRate} Hz; we accept ${minSampleRate} to ${maxSampleRate} Hz (44100 or 48000 are usual).`,
    )
  }
  if (fmt.blockAlign !== (fmt.numChannels * bits) / 8) {
    throw new AudioInputError(422, 'bad-header', 'This WAV file\'s header doesn\'t add up: its frame size doesn\'t match its channels and bit depth.')
  }
  return { channels: fmt.numChannels as 1 | 2, bits: bits as 16 | 24 | 32, sampleFormat: tag === WAVE_FORMAT_IEEE_FLOAT ? 'float' : 'int' }
}

const HOST_IS_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1

/**
 * The common case — a little-endian host and samples aligned in memory — reads through a typed
 * array view, about twice as fast as DataView; otherwise DataView (or bytes, for 24-bit).
 */
function makeAlignedMonoReader(data: Uint8Array, channels: 1 | 2, bits: 16 | 32, sampleFormat: WavSampleFormat): MonoSampleSource['readMono'] | null {
  const bytesPerSample = bits / 8
  if (!HOST_IS_LITTLE_ENDIAN || data.byteOffset % bytesPerSample !== 0) return null
  const length = data.byteLength / bytesPerSample
  if (sampleFormat === 'float') {
    const samples = new Float32Array(data.buffer, data.byteOffset, length)
    return channels === 1
      ? (start, count, out) => out.set(samples.subarray(start, start + count))
      : (start, count, out) => {
          for (let i = 0, p = start * 2; i < count; i++, p += 2) out[i] = 0.5 * (samples[p]! + samples[p + 1]!)
        }
  }
  // Separate closures per array type keep each loop monomorphic.
  if (bits === 16) {
    const samples = new Int16Array(data.buffer, data.byteOffset, length)
    const scale = 1 / 32768
    return channels === 1
      ? (start, count, out) => {
          for (let i = 0, p = start; i < count; i++, p++) out[i] = samples[p]! * scale
        }
      : (start, count, out) => {
          for (let i = 0, p = start * 2; i < count; i++, p += 2) out[i] = (samples[p]! + samples[p + 1]!) * (0.5 * scale)
        }
  }
  const samples = new Int32Array(data.buffer, data.byteOffset, length)
  const scale = 1 / 2147483648
  return channels === 1
    ? (start, count, out) => {
        for (let i = 0, p = start; i < count; i++, p++) out[i] = samples[p]! * scale
      }
    : (start, count, out) => {
        for (let i = 0, p = start * 2; i < count; i++, p += 2) out[i] = (samples[p]! + samples[p + 1]!) * (0.5 * scale)
      }
}

/** A reader that converts interleaved little-endian frames of `data` to mono floats. */
function makeMonoReader(data: Uint8Array, channels: 1 | 2, bits: 16 | 24 | 32, sampleFormat: WavSampleFormat): MonoSampleSource['readMono'] {
  if (bits !== 24) {
    const aligned = makeAlignedMonoReader(data, channels, bits, sampleFormat)
    if (aligned) return aligned
  }
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength)
  if (sampleFormat === 'float') {
    return channels === 1
      ? (start, count, out) => {
          for (let i = 0, p = start * 4; i < count; i++, p += 4) out[i] = view.getFloat32(p, true)
        }
      : (start, count, out) => {
          for (let i = 0, p = start * 8; i < count; i++, p += 8) out[i] = 0.5 * (view.getFloat32(p, true) + view.getFloat32(p + 4, true))
        }
  }
  if (bits === 16) {
    const scale = 1 / 32768
    return channels === 1
      ? (start, count, out) => {
          for (let i = 0, p = start * 2; i < count; i++, p += 2) out[i] = view.getInt16(p, true) * scale
        }
      : (start, count, out) => {
          for (let i = 0, p = start * 4; i < count; i++, p += 4) out[i] = (view.getInt16(p, true) + view.getInt16(p + 2, true)) * (0.5 * scale)
        }
  }
  if (bits === 24) {
    const scale = 1 / 8388608
    return channels === 1
      ? (start, count, out) => {
          for (let i = 0, p = start * 3; i < count; i++, p += 3) out[i] = (((data[p]! | (data[p + 1]! << 8) | (data[p + 2]! << 16)) << 8) >> 8) * scale
        }
      : (start, count, out) => {
          for (let i = 0, p = start * 6; i < count; i++, p += 6) {
            const left = ((data[p]! | (data[p + 1]! << 8) | (data[p + 2]! << 16)) << 8) >> 8
            const right = ((data[p + 3]! | (data[p + 4]! << 8) | (data[p + 5]! << 16)) << 8) >> 8
            out[i] = (left + right) * (0.5 * scale)
          }
        }
  }
  const scale = 1 / 2147483648
  return channels === 1
    ? (start, count, out) => {
        for (let i = 0, p = start * 4; i < count; i++, p += 4) out[i] = view.getInt32(p, true) * scale
      }
    : (start, count, out) => {
        for (let i = 0, p = start * 8; i < count; i++, p += 8) out[i] = (view.getInt32(p, true) + view.getInt32(p + 4, true)) * (0.5 * scale)
      }
}

/**
 * Decode a WAV upload (RIFF/WAVE; PCM 16/24/32-bit, IEEE float 32-bit, or WAVE_FORMAT_EXTENSIBLE
 * with those; mono or stereo; 22.05–96 kHz) into a reader of mono float samples (nothing is
 * converted until asked for). Throws AudioInputError, with a message meant for the maker, for
 * anything else.
 */
export function decodeWav(input: Uint8Array): DecodedWav {
  if (input.length === 0) {
    throw new AudioInputError(400, 'empty', 'The upload is empty: no file arrived. Choose the WAV file of the play-through and try again.')
  }
  const bytes = viewSlicingBytes(input)
  const container = fourCC(bytes, 0)
  if (container !== 'RIFF') {
    if (container === 'RIFX' || container === 'RF64') {
      throw new AudioInputError(415, 'container', `This is a ${container} file (a WAV variant we don't read). ${EXPORT_HINT}`)
    }
    if (bytes.length < 4 && 'RIFF'.startsWith(container.slice(0, bytes.length))) {
      throw new AudioInputError(422, 'truncated', 'This WAV file is cut short: only its first bytes arrived. Upload the whole file again.')
    }
    const looksLike = describeForeignFile(bytes)
    throw new AudioInputError(415, 'not-wav', `This isn't a WAV file${looksLike ? ` (it looks like ${looksLike})` : ''}. ${EXPORT_HINT}`)
  }
  if (bytes.length < 12) {
    throw new AudioInputError(422, 'truncated', 'This WAV file is cut short: only its first bytes arrived. Upload the whole file again.')
  }
  if (fourCC(bytes, 8) !== 'WAVE') {
    throw new AudioInputError(415, 'not-wav', `This is a RIFF file but not a WAV file (it says '${fourCC(bytes, 8)}'). ${EXPORT_HINT}`)
  }

  const layout = checkChunkLayout(bytes)

  const wav = new WaveFile()
  try {
    wav.fromBuffer(bytes)
  }
  catch (error) {
    throw new AudioInputError(422, 'unreadable', `This WAV file couldn't be read (${error instanceof Error ? error.message : 'unknown problem'}).`)
  }
  const fmt = wav.fmt as WaveFmtFields
  const { channels, bits, sampleFormat } = checkFormat(fmt)

  const dataBytes = (wav.data as { samples: Uint8Array }).samples
  // wavefile slices from the first 'data' chunk; the layout check found the same one.
  if (dataBytes.length < layout.dataSize || dataBytes.byteOffset !== input.byteOffset + layout.dataOffset) {
    throw new AudioInputError(422, 'bad-header', 'This WAV file\'s header doesn\'t add up: its audio section couldn\'t be located reliably.')
  }
  const frameBytes = fmt.blockAlign
  const frames = Math.floor(layout.dataSize / frameBytes)
  if (frames === 0) {
    throw new AudioInputError(422, 'no-samples', 'This WAV file contains no audio samples.')
  }
  const durationS = frames / fmt.sampleRate
  if (durationS > SURFACE_WAV_LIMITS.maxSeconds) {
    throw new AudioInputError(
      413,
      'too-long',
      `This recording is ${Math.round(durationS / 60)} minutes long; a surface test is one play-through of a cylinder (at most ${SURFACE_WAV_LIMITS.maxSeconds / 60} minutes).`,
    )
  }
  const data = dataBytes.subarray(0, frames * frameBytes)
  const readMonoFrames = makeMonoReader(data, channels, bits, sampleFormat)
  return {
    sampleRate: fmt.sampleRate,
    frames,
    channels,
    bitsPerSample: bits,
    sampleFormat,
    formatTag: fmt.audioFormat,
    durationS,
    pcm16Mono: channels === 1 && bits === 16 && sampleFormat === 'int' ? data : undefined,
    readMono(start, count, out) {
      if (start < 0 || count < 0 || start + count > frames || count > out.length) {
        throw new RangeError(`readMono(${start}, ${count}) outside 0…${frames} or the buffer`)
      }
      readMonoFrames(start, count, out)
    },
  }
}

/** The whole recording as one mono Float32Array (for tests and small files; the analysis streams). */
export function decodeWavSamples(input: Uint8Array): { wav: DecodedWav, samples: Float32Array } {
  const wav = decodeWav(input)
  const samples = new Float32Array(wav.frames)
  wav.readMono(0, wav.frames, samples)
  return { wav, samples }
}

/** A MonoSampleSource over samples already in memory. */
export function monoSourceFromSamples(samples: Float32Array, sampleRate: number): MonoSampleSource {
  return {
    sampleRate,
    frames: samples.length,
    readMono(start, count, out) {
      out.set(samples.subarray(start, start + count))
    },
  }
}
