// Loading the surface-pass WebAssembly kernel (surfacePass.wat) and laying out its memory.
//
// One instance per process, made on first use: the analysis is synchronous, so two analyses never
// use it at the same time. Its memory is a few hundred KiB whatever the length of the recording
// (the recording is streamed through it in chunks), grown only for unusual sample rates.
import { SURFACE_PASS_WASM_BASE64 } from './surfacePassWasm'

interface KernelExports {
  memory: WebAssembly.Memory
  i16ToF32(src: number, dst: number, count: number): void
  pass(coef: number, state: number, a: number, b: number, frames: number, frameLength: number, out: number): void
}

/** Samples per lane per chunk: 1.6 s at 44.1 kHz in two lanes of f32 stays within a core's L2 cache. */
const LANE_SAMPLES = 30720
/** Values the kernel writes per frame: 5 statistics × 2 lanes. */
export const OUT_VALUES_PER_FRAME = 10

export interface SurfacePassKernel {
  pass: KernelExports['pass']
  /** Frames per call, at most. */
  chunkFrames: number
  /** Byte offsets in the kernel's memory. */
  coef: number
  state: number
  laneA: number
  laneB: number
  out: number
  /** Float64 views of the coefficient, state and output blocks. */
  coefValues: Float64Array
  stateValues: Float64Array
  outValues: Float64Array
  /** Copy mono samples [start, start + count) of a source into a lane (f32 at `lane`). */
  loadLane(lane: number, readMono: (out: Float32Array) => void, count: number): void
  /** Copy little-endian 16-bit samples (2 bytes each) into a lane, converting in the kernel. */
  loadLanePcm16(lane: number, pcm16: Uint8Array): void
}

let exports: KernelExports | null = null

function instance(): KernelExports {
  if (!exports) {
    const module = new WebAssembly.Module(Buffer.from(SURFACE_PASS_WASM_BASE64, 'base64'))
    exports = new WebAssembly.Instance(module, {}).exports as unknown as KernelExports
  }
  return exports
}

const align = (bytes: number, to: number) => Math.ceil(bytes / to) * to

/** The kernel with its memory laid out for frames of `frameLength` samples. */
export function surfacePassKernel(frameLength: number): SurfacePassKernel {
  const kernel = instance()
  const chunkFrames = Math.max(1, Math.floor(LANE_SAMPLES / frameLength))
  const laneSamples = chunkFrames * frameLength
  // i16ToF32 converts in blocks of 8 samples, so each lane and the raw block have room for 8 more.
  const laneBytes = align((laneSamples + 8) * 4, 64)
  const coef = 0
  const state = 128
  const out = 512
  const laneA = align(out + chunkFrames * OUT_VALUES_PER_FRAME * 8, 64)
  const laneB = laneA + laneBytes
  const raw = laneB + laneBytes
  const needed = raw + align((laneSamples + 8) * 2, 64)
  const { memory } = kernel
  if (memory.buffer.byteLength < needed) memory.grow(Math.ceil((needed - memory.buffer.byteLength) / 65536))
  const { buffer } = memory
  const bytes = new Uint8Array(buffer)
  const floats = new Float32Array(buffer)
  return {
    pass: kernel.pass,
    chunkFrames,
    coef,
    state,
    laneA,
    laneB,
    out,
    coefValues: new Float64Array(buffer, coef, 10),
    stateValues: new Float64Array(buffer, state, 18),
    outValues: new Float64Array(buffer, out, chunkFrames * OUT_VALUES_PER_FRAME),
    loadLane(lane, readMono, count) {
      readMono(floats.subarray(lane / 4, lane / 4 + count))
    },
    loadLanePcm16(lane, pcm16) {
      bytes.set(pcm16, raw)
      kernel.i16ToF32(raw, lane, pcm16.length / 2)
    },
  }
}
