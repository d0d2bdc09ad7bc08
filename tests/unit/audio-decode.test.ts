import { describe, expect, it } from 'vitest'
import * as wavefileModule from 'wavefile'
import {
  AudioInputError,
  analyseSurfaceWav,
  decodeWav,
  decodeWavSamples,
  encodeWav,
  makeSeededRandom,
  makeSurfaceWav,
  makeToneSignal,
} from '../../server/audio'

/** Run fn and return the AudioInputError it throws (fails the test if it throws anything else or nothing). */
function inputError(fn: () => unknown): AudioInputError {
  try {
    fn()
  }
  catch (error) {
    if (error instanceof AudioInputError) return error
    throw new Error(`expected an AudioInputError, got ${String(error)}`, { cause: error })
  }
  throw new Error('expected an AudioInputError, but the input was accepted')
}

const small = () => makeSurfaceWav({ seconds: 0.05, levelDbfs: -30, seed: 2 })

/** A copy of a 44-byte-header WAV with some header fields rewritten. */
function withHeader(bytes: Uint8Array, edit: (view: DataView) => void): Uint8Array {
  const copy = bytes.slice()
  edit(new DataView(copy.buffer))
  return copy
}

const ascii = (text: string) => Array.from(text, c => c.charCodeAt(0))
const u32 = (n: number) => [n & 0xff, (n >>> 8) & 0xff, (n >>> 16) & 0xff, (n >>> 24) & 0xff]
const u16 = (n: number) => [n & 0xff, (n >>> 8) & 0xff]

/** A hand-built RIFF/WAVE with an arbitrary fmt chunk and data bytes. */
function rawWav(fmt: { tag: number, channels: number, rate: number, bits: number, blockAlign?: number, extra?: number[] }, data: number[]): Uint8Array {
  const blockAlign = fmt.blockAlign ?? Math.max(1, (fmt.channels * fmt.bits) / 8)
  const fmtBody = [...u16(fmt.tag), ...u16(fmt.channels), ...u32(fmt.rate), ...u32(fmt.rate * blockAlign), ...u16(blockAlign), ...u16(fmt.bits), ...(fmt.extra ?? [])]
  const body = [...ascii('WAVE'), ...ascii('fmt '), ...u32(fmtBody.length), ...fmtBody, ...ascii('data'), ...u32(data.length), ...data]
  if (data.length % 2) body.push(0)
  return new Uint8Array([...ascii('RIFF'), ...u32(body.length), ...body])
}

describe('decoding accepted WAVs', () => {
  it('reads a file written by another writer (wavefile) with a LIST chunk before the audio', () => {
    // Interoperability: wavefile's own writer, with an INFO tag, must decode to the same samples.
    const WaveFile
      = (wavefileModule as unknown as { WaveFile?: typeof wavefileModule.WaveFile }).WaveFile
        ?? (wavefileModule as unknown as { default: typeof wavefileModule }).default.WaveFile
    const tone = makeToneSignal({ frequencyHz: 440, seconds: 0.2, peakDbfs: -6, sampleRate: 48000 })
    const ints = Int16Array.from(tone, x => Math.round(x * 32767))
    const writer = new WaveFile()
    writer.fromScratch(1, 48000, '16', ints)
    writer.setTag('ICMT', 'surface test of blank GW-24-0412')
    const { wav, samples } = decodeWavSamples(writer.toBuffer())
    expect(wav.sampleRate).toBe(48000)
    expect(wav.frames).toBe(ints.length)
    for (let i = 0; i < ints.length; i += 97) expect(samples[i]).toBeCloseTo(ints[i]! / 32768, 9)
  })

  it('averages stereo channels to mono', () => {
    // Arithmetic: (L + R) / 2.
    const bytes = rawWav({ tag: 1, channels: 2, rate: 44100, bits: 16 }, [...u16(16384), ...u16(-8192 & 0xffff), ...u16(0x7fff), ...u16(0x7fff)])
    const { samples } = decodeWavSamples(bytes)
    expect(samples[0]).toBeCloseTo((0.5 - 0.25) / 2, 9)
    expect(samples[1]).toBeCloseTo(32767 / 32768, 9)
  })

  it('reads a view of a larger buffer at any byte offset (typed-array and DataView paths agree)', () => {
    const formats = [{ bits: 16 }, { bits: 24 }, { bits: 32 }, { sampleFormat: 'float' }] as const
    for (const format of formats) {
      for (const channels of [1, 2] as const) {
        const bytes = makeSurfaceWav({ seconds: 0.2, seed: 9, channels, ...format })
        const plain = decodeWavSamples(bytes).samples
        for (const offset of [1, 2, 3]) {
          const padded = new Uint8Array(bytes.length + offset)
          padded.set(bytes, offset)
          expect(decodeWavSamples(padded.subarray(offset)).samples).toEqual(plain)
        }
      }
    }
  })
})

// Status codes: HTTP semantics (RFC 9110) — 400 Bad Request for an empty body, 415 Unsupported
// Media Type for formats we do not read, 422 Unprocessable Content for damaged WAVs.
describe('rejecting what we cannot analyse', () => {
  it('an empty upload → 400', () => {
    const error = inputError(() => decodeWav(new Uint8Array(0)))
    expect(error.statusCode).toBe(400)
    expect(error.message).toMatch(/empty/i)
  })

  it('a JPEG renamed .wav → 415, saying it looks like a JPEG', () => {
    const jpeg = new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, ...ascii('JFIF'), 0, 1, 1, 0, 0, 1, 0, 1, 0, 0, ...new Array(200).fill(0x55)])
    const error = inputError(() => analyseSurfaceWav(jpeg))
    expect(error.statusCode).toBe(415)
    expect(error.message).toMatch(/isn't a WAV file.*JPEG/)
    expect(error.message).toMatch(/PCM WAV/)
  })

  it('other files and WAV variants → 415', () => {
    expect(inputError(() => decodeWav(new Uint8Array([...ascii('fLaC'), 0, 0, 0, 34]))).message).toMatch(/FLAC/)
    expect(inputError(() => decodeWav(new Uint8Array([...ascii('ID3'), 4, 0, 0, 0, 0, 0, 0]))).message).toMatch(/MP3/)
    expect(inputError(() => decodeWav(new Uint8Array([...ascii('RIFF'), 4, 0, 0, 0, ...ascii('AVI ')]))).statusCode).toBe(415)
    const rifx = small()
    rifx.set(ascii('RIFX'), 0)
    expect(inputError(() => decodeWav(rifx)).statusCode).toBe(415)
    expect(inputError(() => decodeWav(new TextEncoder().encode('hello, this is text'))).statusCode).toBe(415)
    expect(inputError(() => decodeWav(new Uint8Array([0, 0]))).statusCode).toBe(415)
    expect(inputError(() => decodeWav(new Uint8Array(ascii('RI')))).statusCode).toBe(422)
  })

  it('a truncated WAV → 422 "cut short"', () => {
    const bytes = makeSurfaceWav({ seconds: 1, seed: 4 })
    const error = inputError(() => decodeWav(bytes.subarray(0, Math.floor(bytes.length * 0.6))))
    expect(error.statusCode).toBe(422)
    expect(error.message).toMatch(/cut short/)
  })

  it('a header whose sizes lie → 422', () => {
    // data size larger than the file
    const tooBig = withHeader(small(), view => view.setUint32(40, view.getUint32(40, true) + 1000, true))
    expect(inputError(() => decodeWav(tooBig)).statusCode).toBe(422)
    // RIFF size smaller than its own audio
    const riffTooSmall = withHeader(small(), view => view.setUint32(4, 100, true))
    const error = inputError(() => decodeWav(riffTooSmall))
    expect(error.statusCode).toBe(422)
    expect(error.message).toMatch(/doesn't add up/)
    // RIFF size larger than the file
    const riffTooBig = withHeader(small(), view => view.setUint32(4, view.getUint32(4, true) + 5000, true))
    expect(inputError(() => decodeWav(riffTooBig)).statusCode).toBe(422)
    // block align that does not match channels × bytes per sample
    const badAlign = withHeader(small(), view => view.setUint16(32, 3, true))
    expect(inputError(() => decodeWav(badAlign)).statusCode).toBe(422)
  })

  it('an 8-bit file → 415', () => {
    const error = inputError(() => decodeWav(rawWav({ tag: 1, channels: 1, rate: 44100, bits: 8 }, new Array(100).fill(128))))
    expect(error.statusCode).toBe(415)
    expect(error.message).toMatch(/8-bit/)
  })

  it('an ADPCM file (format tag 2) → 415 naming the codec', () => {
    const adpcm = rawWav({ tag: 2, channels: 1, rate: 22050, bits: 4, blockAlign: 256, extra: [...u16(32), ...new Array(32).fill(0)] }, new Array(512).fill(0x11))
    const error = inputError(() => decodeWav(adpcm))
    expect(error.statusCode).toBe(415)
    expect(error.message).toMatch(/ADPCM/)
  })

  it('µ-law, 64-bit float, 12-bit, > 2 channels and sample rates out of range → 415', () => {
    const cases: Array<[Parameters<typeof rawWav>[0], RegExp]> = [
      [{ tag: 7, channels: 1, rate: 8000, bits: 8 }, /µ-law/],
      [{ tag: 3, channels: 1, rate: 44100, bits: 64 }, /64-bit floating point/],
      [{ tag: 1, channels: 1, rate: 44100, bits: 12, blockAlign: 2 }, /12-bit/],
      [{ tag: 1, channels: 6, rate: 48000, bits: 16 }, /6 channels/],
      [{ tag: 1, channels: 1, rate: 8000, bits: 16 }, /8000 Hz/],
      [{ tag: 1, channels: 1, rate: 192000, bits: 16 }, /192000 Hz/],
    ]
    for (const [fmt, message] of cases) {
      const error = inputError(() => decodeWav(rawWav(fmt, new Array(96).fill(0))))
      expect(error.statusCode).toBe(415)
      expect(error.message).toMatch(message)
    }
  })

  it('extensible headers are judged by their sub-format', () => {
    const extensible = (subformat: number) => [...u16(22), ...u16(16), ...u32(4), ...u16(subformat), ...[0, 0, 0, 0, 0x10, 0, 0x80, 0, 0, 0xaa, 0, 0x38, 0x9b, 0x71]]
    const pcm = rawWav({ tag: 0xfffe, channels: 1, rate: 44100, bits: 16, extra: extensible(1) }, [...u16(16384), ...u16(16384)])
    expect(decodeWavSamples(pcm).samples[0]).toBe(0.5)
    const alaw = rawWav({ tag: 0xfffe, channels: 1, rate: 44100, bits: 16, extra: extensible(6) }, [0, 0])
    expect(inputError(() => decodeWav(alaw)).message).toMatch(/A-law/)
  })

  it('no data chunk, no samples, NaN samples → 422', () => {
    const noData = small().subarray(0, 36)
    noData.set(u32(28), 4)
    expect(inputError(() => decodeWav(noData)).message).toMatch(/no audio section/)
    expect(inputError(() => decodeWav(rawWav({ tag: 1, channels: 1, rate: 44100, bits: 16 }, []))).message).toMatch(/no audio samples/)
    const nan = encodeWav(new Float32Array([0.1, Number.NaN, 0.2]), { sampleRate: 44100, sampleFormat: 'float' })
    expect(inputError(() => analyseSurfaceWav(nan)).statusCode).toBe(422)
  })

  it('hostile chunk layouts are refused quickly (cue/smpl counts, LIST storms, chunk floods)', () => {
    const wav = small()
    const header = wav.subarray(12, 36)
    const data = wav.subarray(36)
    const build = (...chunks: number[][]) => {
      const body = [...ascii('WAVE'), ...header, ...chunks.flat(), ...data]
      return new Uint8Array([...ascii('RIFF'), ...u32(body.length), ...body])
    }
    const started = performance.now()
    const cueBomb = build([...ascii('cue '), ...u32(8), ...u32(0x7fffffff), ...u32(0)])
    expect(inputError(() => decodeWav(cueBomb)).statusCode).toBe(422)
    const smplBomb = build([...ascii('smpl'), ...u32(36), ...new Array(28).fill(0), ...u32(0x7fffffff), ...u32(0)])
    expect(inputError(() => decodeWav(smplBomb)).statusCode).toBe(422)
    const listStorm = build(...Array.from({ length: 3000 }, () => [...ascii('LIST'), ...u32(4), ...ascii('INFO')]))
    expect(inputError(() => decodeWav(listStorm)).statusCode).toBe(422)
    const flood = build(...Array.from({ length: 5000 }, () => [...ascii('junk'), ...u32(0)]))
    expect(inputError(() => decodeWav(flood)).statusCode).toBe(422)
    expect(performance.now() - started).toBeLessThan(2000)
  })
})

describe('garbage never hangs or crashes the decoder', () => {
  const allowed = (fn: () => unknown) => {
    try {
      fn()
    }
    catch (error) {
      if (!(error instanceof AudioInputError)) throw error
      expect([400, 413, 415, 422]).toContain(error.statusCode)
      expect(error.message.length).toBeGreaterThan(10)
    }
  }

  it('random bytes', () => {
    const random = makeSeededRandom(1234)
    for (let trial = 0; trial < 300; trial++) {
      const length = Math.floor(random() * 2000)
      const bytes = Uint8Array.from({ length }, () => Math.floor(random() * 256))
      // Half of them get a plausible RIFF/WAVE start so the fuzz reaches the chunk walk.
      if (trial % 2 && length >= 12) bytes.set([...ascii('RIFF'), ...u32(length - 8), ...ascii('WAVE')], 0)
      allowed(() => analyseSurfaceWav(bytes))
    }
  })

  it('truncation at every byte of the header and around the end', () => {
    const bytes = makeSurfaceWav({ seconds: 0.02, seed: 8, bits: 24, channels: 2, extensible: true })
    const cuts = [...Array.from({ length: 80 }, (_, i) => i), bytes.length - 3, bytes.length - 2, bytes.length - 1]
    for (const cut of cuts) {
      const error = inputError(() => analyseSurfaceWav(bytes.subarray(0, cut)))
      expect(error.statusCode).toBe(cut === 0 ? 400 : 422)
    }
  })

  it('random mutations of header bytes', () => {
    const random = makeSeededRandom(99)
    const original = makeSurfaceWav({ seconds: 0.05, seed: 3 })
    const started = performance.now()
    for (let trial = 0; trial < 600; trial++) {
      const bytes = original.slice()
      const flips = 1 + Math.floor(random() * 3)
      for (let f = 0; f < flips; f++) bytes[Math.floor(random() * 44)] = Math.floor(random() * 256)
      allowed(() => analyseSurfaceWav(bytes))
    }
    expect(performance.now() - started).toBeLessThan(10000)
  })
})
