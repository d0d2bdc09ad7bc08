// A worker thread's entry: the averaged spectrum (spectrum.ts) of a WAV whose bytes the main thread shares with
// it (a Uint8Array on a SharedArrayBuffer, so nothing is copied). The main thread measures levels, clicks and the
// once-per-turn meanwhile (parallel.ts). Bundled on its own into the built server by the build (nuxt.config.ts).
import { parentPort } from 'node:worker_threads'
import { decodeWav } from './decode'
import { measureSpectrum, type SpectrumBand } from './spectrum'

parentPort!.on('message', ({ id, bytes }: { id: number, bytes: Uint8Array }) => {
  let bands: SpectrumBand[] | null = null
  try {
    bands = measureSpectrum(decodeWav(bytes))
  }
  catch {
    // The main thread reads the same bytes and says what is wrong with them; null just means "not measured here".
  }
  parentPort!.postMessage({ id, bands })
})
