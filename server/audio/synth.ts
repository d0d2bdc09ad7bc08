// Synthetic surface-test recordings with known answers, for the tests and the demo seed.
// Pure computation (no fs): the seed runs inside the server and writes the bytes where it likes.
//
// A "surface" is Gaussian noise from a seeded PRNG (white, or "soft": a gentle first-order tilt)
// scaled so its RMS level is exactly `levelDbfs` (AES17: a full-scale sine reads 0 dBFS),
// optionally amplitude-modulated once per turn, noise × (1 + swellDepth·sin(2π·rpm/60·t + φ)),
// plus `clicks` short decaying spikes at random but separated times, `clickLevelDb` above the
// noise's RMS. Stereo files carry the same signal in both channels, so they read the same level
// as the mono file.

const AES17_OFFSET_DB = 10 * Math.log10(2)

export type SynthSampleFormat = 'int' | 'float'

export interface WavEncodingOptions {
  sampleRate: number
  /** 16, 24 or 32 for integer PCM; 32 for float. */
  bits?: 16 | 24 | 32
  sampleFormat?: SynthSampleFormat
  channels?: 1 | 2
  /** Write a WAVE_FORMAT_EXTENSIBLE header instead of plain PCM/float. */
  extensible?: boolean
}

export interface SurfaceWavOptions extends Omit<WavEncodingOptions, 'sampleRate'> {
  seconds: number
  sampleRate?: number
  /** RMS level of the surface noise, dBFS (AES17). */
  levelDbfs?: number
  colour?: 'white' | 'soft'
  rpm?: number
  /** Depth d of the once-per-turn swell, 0 … 1 (0 = none). */
  swellDepth?: number
  clicks?: number
  /** Peak of each click above the noise RMS, dB. */
  clickLevelDb?: number
  seed?: number
}

export interface ToneWavOptions extends Omit<WavEncodingOptions, 'sampleRate'> {
  waveform?: 'sine' | 'square'
  frequencyHz: number
  /** Peak level in dBFS; 0 = full scale. */
  peakDbfs?: number
  seconds: number
  sampleRate?: number
}

/** mulberry32: a small, fast 32-bit PRNG; plenty for test noise and fully reproducible. */
export function makeSeededRandom(seed: number): () => number {
  let state = seed >>> 0
  return () => {
    state = (state + 0x6d2b79f5) >>> 0
    let t = state
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Fill `out` with standard normal values (Box–Muller, both outputs used). */
function fillGaussian(out: Float32Array, random: () => number): void {
  for (let i = 0; i < out.length; i += 2) {
    const u = 1 - random()
    const v = random()
    const radius = Math.sqrt(-2 * Math.log(u))
    out[i] = radius * Math.cos(2 * Math.PI * v)
    if (i + 1 < out.length) out[i + 1] = radius * Math.sin(2 * Math.PI * v)
  }
}

export interface SurfaceSignal {
  samples: Float32Array
  sampleRate: number
  clickTimesS: number[]
}

/** The surface signal as floats (full scale ±1), with the click times it contains. */
export function makeSurfaceSignal(options: SurfaceWavOptions): SurfaceSignal {
  const sampleRate = options.sampleRate ?? 44100
  const levelDbfs = options.levelDbfs ?? -50
  const rpm = options.rpm ?? 160
  const swellDepth = options.swellDepth ?? 0
  const clickCount = options.clicks ?? 0
  const clickLevelDb = options.clickLevelDb ?? 30
  const random = makeSeededRandom(options.seed ?? 1)
  if (!(options.seconds > 0)) throw new RangeError('seconds must be positive')
  if (!(swellDepth >= 0 && swellDepth <= 1)) throw new RangeError('swellDepth must be between 0 and 1')

  const n = Math.round(options.seconds * sampleRate)
  const samples = new Float32Array(n)
  fillGaussian(samples, random)

  if (options.colour === 'soft') {
    // First-order low-pass at 3 kHz mixed with a little of the white noise: a gentle tilt.
    const a = 1 - Math.exp((-2 * Math.PI * 3000) / sampleRate)
    let state = 0
    for (let i = 0; i < n; i++) {
      state += a * (samples[i]! - state)
      samples[i] = state + 0.15 * samples[i]!
    }
  }

  if (swellDepth > 0) {
    const phase = 2 * Math.PI * random()
    const omega = (2 * Math.PI * (rpm / 60)) / sampleRate
    for (let i = 0; i < n; i++) samples[i] = samples[i]! * (1 + swellDepth * Math.sin(omega * i + phase))
  }

  let sumSquares = 0
  for (let i = 0; i < n; i++) sumSquares += samples[i]! * samples[i]!
  const targetRms = Math.pow(10, (levelDbfs - AES17_OFFSET_DB) / 20)
  const gain = targetRms / Math.sqrt(sumSquares / n)
  for (let i = 0; i < n; i++) samples[i] = samples[i]! * gain

  // Clicks: one per equal slot of the recording (away from the ends), at a random place in the
  // middle 60 % of its slot, so they are random but never closer than 40 % of a slot.
  const clickTimesS: number[] = []
  if (clickCount > 0) {
    const margin = Math.min(0.25, options.seconds / 10)
    const slot = (options.seconds - 2 * margin) / clickCount
    const amplitude = targetRms * Math.pow(10, clickLevelDb / 20)
    const decaySamples = 0.00025 * sampleRate
    const length = Math.ceil(decaySamples * 8)
    for (let c = 0; c < clickCount; c++) {
      const time = margin + slot * (c + 0.2 + 0.6 * random())
      const polarity = random() < 0.5 ? -1 : 1
      const start = Math.round(time * sampleRate)
      for (let k = 0; k < length && start + k < n; k++) {
        samples[start + k] = samples[start + k]! + polarity * amplitude * Math.exp(-k / decaySamples)
      }
      clickTimesS.push(start / sampleRate)
    }
  }
  return { samples, sampleRate, clickTimesS }
}

/** A pure sine or square wave (the square switches sign at the sine's zero crossings). */
export function makeToneSignal(options: ToneWavOptions): Float32Array {
  const sampleRate = options.sampleRate ?? 44100
  const amplitude = Math.pow(10, (options.peakDbfs ?? 0) / 20)
  const n = Math.round(options.seconds * sampleRate)
  const omega = (2 * Math.PI * options.frequencyHz) / sampleRate
  const samples = new Float32Array(n)
  for (let i = 0; i < n; i++) {
    // Phase offset of a quarter sample keeps the square wave off exact zeros.
    const s = Math.sin(omega * (i + 0.25))
    samples[i] = options.waveform === 'square' ? (s >= 0 ? amplitude : -amplitude) : amplitude * s
  }
  return samples
}

const KSDATAFORMAT_SUBTYPE_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71]

/** Write float samples (full scale ±1) as a RIFF/WAVE file; integer formats are rounded and clipped. */
export function encodeWav(samples: Float32Array, options: WavEncodingOptions): Uint8Array {
  const sampleFormat = options.sampleFormat ?? 'int'
  const bits = sampleFormat === 'float' ? 32 : (options.bits ?? 16)
  const channels = options.channels ?? 1
  const extensible = options.extensible ?? false
  const bytesPerSample = bits / 8
  const blockAlign = bytesPerSample * channels
  const dataSize = samples.length * blockAlign
  const fmtSize = extensible ? 40 : 16
  const headerSize = 12 + 8 + fmtSize + 8
  const out = new Uint8Array(headerSize + dataSize + (dataSize % 2))
  const view = new DataView(out.buffer)
  const ascii = (offset: number, text: string) => {
    for (let i = 0; i < text.length; i++) out[offset + i] = text.charCodeAt(i)
  }
  const formatTag = sampleFormat === 'float' ? 3 : 1
  ascii(0, 'RIFF')
  view.setUint32(4, out.length - 8, true)
  ascii(8, 'WAVE')
  ascii(12, 'fmt ')
  view.setUint32(16, fmtSize, true)
  view.setUint16(20, extensible ? 0xfffe : formatTag, true)
  view.setUint16(22, channels, true)
  view.setUint32(24, options.sampleRate, true)
  view.setUint32(28, options.sampleRate * blockAlign, true)
  view.setUint16(32, blockAlign, true)
  view.setUint16(34, bits, true)
  if (extensible) {
    view.setUint16(36, 22, true)
    view.setUint16(38, bits, true)
    view.setUint32(40, channels === 1 ? 0x4 : 0x3, true)
    view.setUint16(44, formatTag, true)
    out.set(KSDATAFORMAT_SUBTYPE_TAIL, 46)
  }
  ascii(12 + 8 + fmtSize, 'data')
  view.setUint32(12 + 8 + fmtSize + 4, dataSize, true)

  let p = headerSize
  const fullScale = Math.pow(2, bits - 1)
  const max = fullScale - 1
  for (let i = 0; i < samples.length; i++) {
    const x = samples[i]!
    if (sampleFormat === 'float') {
      for (let c = 0; c < channels; c++, p += 4) view.setFloat32(p, x, true)
      continue
    }
    const q = Math.max(-fullScale, Math.min(max, Math.round(x * fullScale)))
    for (let c = 0; c < channels; c++) {
      if (bits === 16) view.setInt16(p, q, true)
      else if (bits === 32) view.setInt32(p, q, true)
      else {
        out[p] = q & 0xff
        out[p + 1] = (q >> 8) & 0xff
        out[p + 2] = (q >> 16) & 0xff
      }
      p += bytesPerSample
    }
  }
  return out
}

/** A synthetic surface-test WAV (see the comment at the top). */
export function makeSurfaceWav(options: SurfaceWavOptions): Uint8Array {
  const signal = makeSurfaceSignal(options)
  return encodeWav(signal.samples, { ...options, sampleRate: signal.sampleRate })
}

/** A sine or square test tone as a WAV. */
export function makeToneWav(options: ToneWavOptions): Uint8Array {
  const sampleRate = options.sampleRate ?? 44100
  return encodeWav(makeToneSignal(options), { ...options, sampleRate })
}
