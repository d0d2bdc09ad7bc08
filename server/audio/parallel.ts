// The surface analysis on two threads: the averaged spectrum (a fifth of the work, independent of the rest) is
// measured by a worker thread while this thread runs the level pass, the click search and the once-per-turn
// measure. The answer is the same as analyseSurfaceWav's, to the bit: the same code measures the same bytes.
//
// The worker is the file the build writes beside the server's entry (SPECTRUM_WORKER_FILE); where there is none
// (development server, unit tests) or the bytes are not shared memory, everything runs on this thread. It starts
// on the first analysis and stops after a minute without one, so an idle server carries no second thread.
import { existsSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { Worker } from 'node:worker_threads'
import { analyseSurfaceWav, type SurfaceAnalysis, type SurfaceAnalysisOptions } from './analyse'
import type { MonoSampleSource } from './decode'
import { measureSpectrum, type SpectrumBand } from './spectrum'

export const SPECTRUM_WORKER_FILE = 'audio-spectrum-worker.mjs'
const IDLE_MS = 60_000

interface SpectrumHelper {
  measure(bytes: Uint8Array): Promise<SpectrumBand[] | null>
}

let workerFile: string | null | undefined
let helper: SpectrumHelper | null = null

/** The built worker, looked for beside this module's chunk and up to three folders above it. */
function findWorkerFile(): string | null {
  let folder = dirname(fileURLToPath(import.meta.url))
  for (let depth = 0; depth < 4; depth++) {
    const candidate = join(folder, SPECTRUM_WORKER_FILE)
    if (existsSync(candidate)) return candidate
    folder = dirname(folder)
  }
  return null
}

function startHelper(file: string): SpectrumHelper {
  const worker = new Worker(file)
  // Neither the thread nor its idle timer keeps the process alive.
  worker.unref()
  const waiting = new Map<number, (bands: SpectrumBand[] | null) => void>()
  let nextId = 1
  let idle: NodeJS.Timeout | undefined
  const stopped = () => {
    if (helper === measurer) helper = null
    for (const done of waiting.values()) done(null)
    waiting.clear()
  }
  worker.on('message', ({ id, bands }: { id: number, bands: SpectrumBand[] | null }) => {
    waiting.get(id)?.(bands)
    waiting.delete(id)
    if (waiting.size === 0) {
      clearTimeout(idle)
      idle = setTimeout(() => {
        if (waiting.size === 0) void worker.terminate()
      }, IDLE_MS).unref()
    }
  })
  worker.on('error', stopped)
  worker.on('exit', stopped)
  const measurer: SpectrumHelper = {
    measure(bytes) {
      const id = nextId++
      return new Promise((resolve) => {
        waiting.set(id, resolve)
        worker.postMessage({ id, bytes })
      })
    },
  }
  return measurer
}

function spectrumHelper(): SpectrumHelper | null {
  workerFile ??= findWorkerFile()
  if (!workerFile) return null
  helper ??= startHelper(workerFile)
  return helper
}

/**
 * analyseSurfaceWav, with the spectrum measured on the worker thread when the bytes are shared memory (the upload
 * reader puts surface tests there) and the worker is built; otherwise on this thread (`threads` says which). Throws
 * as analyseSurfaceWav.
 */
export async function analyseSurfaceWavInParallel(bytes: Uint8Array, options: SurfaceAnalysisOptions = {}): Promise<{ analysis: SurfaceAnalysis, threads: 1 | 2 }> {
  const worker = bytes.buffer instanceof SharedArrayBuffer ? spectrumHelper() : null
  if (!worker) return { analysis: analyseSurfaceWav(bytes, options), threads: 1 }
  const spectrum = worker.measure(bytes)
  let source: MonoSampleSource | undefined
  const analysis = analyseSurfaceWav(bytes, options, (decoded) => {
    source = decoded
    return []
  })
  // The worker answers null if it stopped or could not measure: then this thread measures it after all.
  const bands = await spectrum
  return bands ? { analysis: { ...analysis, spectrum: bands }, threads: 2 } : { analysis: { ...analysis, spectrum: measureSpectrum(source!) }, threads: 1 }
}
