// WebAssembly text → base64 binary through wabt (the WebAssembly Binary Toolkit's own JS build).
// Shared by scripts/build-audio-kernel.ts and the unit test that checks the committed binary.
import wabtInit from 'wabt'

export async function assembleSurfacePassKernel(wat: string): Promise<string> {
  const wabt = await wabtInit()
  const module = wabt.parseWat('surfacePass.wat', wat, { simd: true })
  try {
    module.validate()
    return Buffer.from(module.toBinary({}).buffer).toString('base64')
  }
  finally {
    module.destroy()
  }
}
