// The surface-test analysis: decode the WAV, measure, judge.
//
// Memory: the upload's bytes are only read, never copied or converted as a whole: the analysis
// streams through them in chunks of 1.6 s with one reusable buffer. What grows with the length of
// the recording is per-frame (10 ms) data, a few per cent of a 16-bit mono file; the rest is
// fixed-size FFT buffers. (tests/bench/audio.bench.ts measures it.)
import { findClicks, type ClickResult } from './clicks'
import { AudioInputError, decodeWav, monoSourceFromSamples, type MonoSampleSource } from './decode'
import { AES17_RMS_OFFSET_DB, runSurfacePass, toDb } from './levels'
import { measureRotary, MIN_ROTATIONS_FOR_ROTARY } from './rotary'
import { measureSpectrum, type SpectrumBand } from './spectrum'
import { judgeSurface, surfaceThresholdsSchema, type SurfaceThresholdsInput, type SurfaceVerdict } from './verdict'

export interface SurfaceAnalysisOptions {
  /** Playback speed of the test, revolutions per minute (120, 144, 160 …). */
  rpm?: number
  thresholds?: SurfaceThresholdsInput
}

export interface SurfaceAnalysis {
  durationS: number
  sampleRate: number
  channels: 1 | 2
  bitsPerSample: 16 | 24 | 32
  sampleFormat: 'int' | 'float'
  rpm: number
  /** Sample peak, 20·log10(max |x|). */
  peakDbfs: number
  /** RMS level, AES17 (full-scale sine = 0 dBFS). */
  rmsDbfs: number
  /** A-weighted RMS level (IEC 61672-1), AES17. */
  aWeightedDbfs: number
  /** 20·log10(peak / rms), without the AES17 offset. */
  crestDb: number
  /** Once-per-turn strength, dB (see rotary.ts); null when the recording is too short. */
  rotaryDb: number | null
  /** The strongest envelope line near rpm/60 when a once-per-turn component is detected. */
  rotaryHz: number | null
  rotaryDetected: boolean
  /** Peak-to-peak level swing attributable to the once-per-turn component, dB. */
  rotarySwingDb: number | null
  clickCount: number
  clicksPerMinute: number
  /** Times of the clicks in seconds (at most 1000). */
  clickTimesS: number[]
  verdict: SurfaceVerdict
  reasons: string[]
  /** 1/3-octave band levels, AES17 dBFS. */
  spectrum: SpectrumBand[]
  /** RMS level (AES17 dBFS) over consecutive stretches of `envelopeSeconds` each, for plotting. */
  envelope: number[]
  envelopeSeconds: number
}

export const ENVELOPE_MAX_POINTS = 800
export const DEFAULT_SURFACE_RPM = 160

const round2 = (value: number) => Math.round(value * 100) / 100

function plotEnvelope(frameEnergy: Float64Array, frameLength: number, totalSamples: number): { envelope: number[], framesPerPoint: number } {
  const frames = frameEnergy.length
  const framesPerPoint = Math.max(1, Math.ceil(frames / ENVELOPE_MAX_POINTS))
  const envelope: number[] = []
  for (let start = 0; start < frames; start += framesPerPoint) {
    const end = Math.min(frames, start + framesPerPoint)
    let energy = 0
    for (let i = start; i < end; i++) energy += frameEnergy[i]!
    const samples = Math.min(totalSamples, end * frameLength) - start * frameLength
    envelope.push(round2(toDb(energy / samples) + AES17_RMS_OFFSET_DB))
  }
  return { envelope, framesPerPoint }
}

/** Measure a mono source (a decoded WAV, or samples in memory via monoSourceFromSamples). */
export function analyseSurfaceSource(
  source: MonoSampleSource,
  options: SurfaceAnalysisOptions = {},
  spectrumOf: (source: MonoSampleSource) => SpectrumBand[] = measureSpectrum,
): Omit<SurfaceAnalysis, 'channels' | 'bitsPerSample' | 'sampleFormat'> {
  const rpm = options.rpm ?? DEFAULT_SURFACE_RPM
  if (!(rpm >= 30 && rpm <= 300)) throw new RangeError(`rpm must be between 30 and 300, got ${rpm}`)
  const thresholds = surfaceThresholdsSchema.parse(options.thresholds ?? {})
  const { sampleRate } = source
  if (!(source.frames > 0)) throw new RangeError('there are no samples to analyse')
  const durationS = source.frames / sampleRate

  const pass = runSurfacePass(source)
  if (!Number.isFinite(pass.meanSquare) || !Number.isFinite(pass.aWeightedMeanSquare)) {
    throw new AudioInputError(422, 'not-a-number', 'This WAV file is damaged: some of its samples are not numbers (NaN or infinity).')
  }
  const peakDbfs = toDb(pass.peak * pass.peak)
  const rmsDbfs = toDb(pass.meanSquare) + AES17_RMS_OFFSET_DB
  const aWeightedDbfs = toDb(pass.aWeightedMeanSquare) + AES17_RMS_OFFSET_DB
  const crestDb = pass.meanSquare > 0 ? 20 * Math.log10(pass.peak / Math.sqrt(pass.meanSquare)) : 0

  const { frameLength } = pass
  const completeFrames = pass.lastFrameLength === frameLength ? pass.frameEnergy.length : pass.frameEnergy.length - 1
  const rotary = measureRotary(pass.aWeightedFrameEnergy.subarray(0, completeFrames), frameLength, sampleRate / frameLength, rpm)

  const clicks = findClicks(source, pass)
  const clicksPerMinute = clicks.count / (durationS / 60)

  const { envelope, framesPerPoint } = plotEnvelope(pass.frameEnergy, frameLength, source.frames)
  const { verdict, reasons } = judgeSurface(
    {
      aWeightedDbfs,
      rotaryDb: rotary.rotaryDb,
      rotaryHz: rotary.rotaryHz,
      clicksPerMinute,
      peakDbfs,
      durationS,
      minimumRotarySeconds: (MIN_ROTATIONS_FOR_ROTARY * 60) / rpm + 1,
    },
    thresholds,
  )

  return {
    durationS,
    sampleRate,
    rpm,
    peakDbfs,
    rmsDbfs,
    aWeightedDbfs,
    crestDb,
    rotaryDb: rotary.rotaryDb,
    rotaryHz: rotary.rotaryHz,
    rotaryDetected: rotary.rotaryDetected,
    rotarySwingDb: rotary.rotarySwingDb,
    clickCount: clicks.count,
    clicksPerMinute,
    clickTimesS: clicks.timesS,
    verdict,
    reasons,
    spectrum: spectrumOf(source),
    envelope,
    envelopeSeconds: (framesPerPoint * frameLength) / sampleRate,
  }
}

/** Measure mono float samples already in memory (full scale ±1). */
export function analyseSurfaceSamples(samples: Float32Array, sampleRate: number, options: SurfaceAnalysisOptions = {}) {
  return analyseSurfaceSource(monoSourceFromSamples(samples, sampleRate), options)
}

/** Count clicks in samples already in memory (see clicks.ts). */
export function countClicks(samples: Float32Array, sampleRate: number): ClickResult {
  const source = monoSourceFromSamples(samples, sampleRate)
  return findClicks(source, runSurfacePass(source))
}

/**
 * Analyse a surface-test WAV upload. Throws AudioInputError (with `statusCode`) for files we
 * cannot read, a ZodError for invalid thresholds and a RangeError for an impossible rpm.
 */
export function analyseSurfaceWav(bytes: Uint8Array, options: SurfaceAnalysisOptions = {}, spectrumOf?: (source: MonoSampleSource) => SpectrumBand[]): SurfaceAnalysis {
  const decoded = decodeWav(bytes)
  const measured = analyseSurfaceSource(decoded, options, spectrumOf)
  return {
    ...measured,
    channels: decoded.channels,
    bitsPerSample: decoded.bitsPerSample,
    sampleFormat: decoded.sampleFormat,
  }
}
