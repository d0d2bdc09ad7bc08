// Surface-test analysis benchmark: `npx tsx tests/bench/audio.bench.ts` (not a vitest file).
//
// Generates a 150 s, 44.1 kHz, 16-bit mono surface recording in a temp dir, then
//  - times analyseSurfaceWav (best of RUNS after a warm-up run),
//  - times `sox FILE -n stats` on the same file (best of RUNS, including process start),
//  - measures the analysis' extra memory: peak RSS during one analysis minus RSS before it.
//    On Linux the peak is read from /proc/self/status (VmHWM) after resetting it through
//    /proc/self/clear_refs; elsewhere only the arrayBuffers growth is shown.
// Goals (issue 4): time ratio ≤ 1.5 and extra memory ≤ 4 × the file size.
import { spawnSync } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { setFlagsFromString } from 'node:v8'
import { runInNewContext } from 'node:vm'
import { analyseSurfaceWav, makeSurfaceWav } from '../../server/audio'

const RUNS = 15
const SECONDS = 150

setFlagsFromString('--expose-gc')
const collectGarbage = runInNewContext('gc') as () => void

function procStatusKb(field: string): number | null {
  try {
    const match = readFileSync('/proc/self/status', 'utf8').match(new RegExp(`^${field}:\\s+(\\d+) kB`, 'm'))
    return match ? Number(match[1]) : null
  }
  catch {
    return null
  }
}

function resetPeakRss(): boolean {
  try {
    writeFileSync('/proc/self/clear_refs', '5')
    return true
  }
  catch {
    return false
  }
}

const mb = (bytes: number) => `${(bytes / 1048576).toFixed(1)} MB`

const dir = mkdtempSync(join(tmpdir(), 'groovewright-bench-'))
try {
  const file = join(dir, 'surface-150s.wav')
  writeFileSync(file, makeSurfaceWav({ seconds: SECONDS, sampleRate: 44100, bits: 16, levelDbfs: -50, swellDepth: 0.3, clicks: 12, seed: 7 }))
  const bytes = new Uint8Array(readFileSync(file))
  console.log(`file: ${file} (${mb(bytes.length)}, ${SECONDS} s, 44.1 kHz, 16-bit mono)`)

  // Memory first, in a process that has not yet run the analysis at full size (only a short warm-up,
  // so the code is compiled but no large garbage is lying around).
  analyseSurfaceWav(makeSurfaceWav({ seconds: 5, seed: 3 }))
  collectGarbage()
  const rssBeforeKb = procStatusKb('VmRSS')
  const arrayBuffersBefore = process.memoryUsage().arrayBuffers
  const canTrackPeak = rssBeforeKb !== null && resetPeakRss()
  const result = analyseSurfaceWav(bytes)
  const peakKb = canTrackPeak ? procStatusKb('VmHWM') : null
  const arrayBuffersAfter = process.memoryUsage().arrayBuffers
  let extraBytes: number | null = null
  if (peakKb !== null && rssBeforeKb !== null) {
    extraBytes = (peakKb - rssBeforeKb) * 1024
    console.log(`memory: peak RSS during analysis − RSS before = ${mb(extraBytes)} = ${(extraBytes / bytes.length).toFixed(2)} × file size (goal ≤ 4)`)
  }
  else {
    console.log('memory: peak RSS not available on this platform')
  }
  console.log(`memory: arrayBuffers still held right after the analysis (before GC): ${mb(arrayBuffersAfter - arrayBuffersBefore)}`)
  console.log(`result: rms ${result.rmsDbfs.toFixed(2)} dBFS, A ${result.aWeightedDbfs.toFixed(2)} dBFS(A), rotary ${result.rotaryDb?.toFixed(1)} dB at ${result.rotaryHz?.toFixed(3)} Hz, ${result.clickCount} clicks, ${result.verdict}`)

  // Interleave the two so that a busy machine slows both alike; report the best and the median of
  // wall-clock time, and CPU time too (user + system; for sox through GNU time when available),
  // which a machine busy with other work disturbs much less.
  const analysisWall: number[] = []
  const analysisCpu: number[] = []
  const soxWall: number[] = []
  const soxCpu: number[] = []
  const hasGnuTime = spawnSync('/usr/bin/time', ['-f', '%U', 'true'], { encoding: 'utf8' }).status === 0
  let soxMissing = spawnSync('sox', ['--version']).status !== 0
  for (let run = 0; run < RUNS; run++) {
    collectGarbage()
    const cpuStart = process.cpuUsage()
    const start = performance.now()
    analyseSurfaceWav(bytes)
    analysisWall.push(performance.now() - start)
    const cpu = process.cpuUsage(cpuStart)
    analysisCpu.push((cpu.user + cpu.system) / 1000)
    if (soxMissing) continue
    const soxStart = performance.now()
    const sox = hasGnuTime
      ? spawnSync('/usr/bin/time', ['-f', 'cpu %U %S', 'sox', file, '-n', 'stats'], { encoding: 'utf8' })
      : spawnSync('sox', [file, '-n', 'stats'], { encoding: 'utf8' })
    soxWall.push(performance.now() - soxStart)
    if (sox.status !== 0) {
      soxMissing = true
      continue
    }
    const times = sox.stderr.match(/^cpu ([\d.]+) ([\d.]+)$/m)
    if (times) soxCpu.push((Number(times[1]) + Number(times[2])) * 1000)
  }
  const best = (times: number[]) => Math.min(...times)
  const median = (times: number[]) => [...times].sort((a, b) => a - b)[Math.floor(times.length / 2)]!
  const verdict = (ratio: number) => `${ratio.toFixed(2)} (goal ≤ 1.5) ${ratio <= 1.5 ? 'OK' : 'OVER'}`
  console.log(`analyseSurfaceWav: wall best ${best(analysisWall).toFixed(1)} ms, median ${median(analysisWall).toFixed(1)} ms; CPU best ${best(analysisCpu).toFixed(0)} ms (${RUNS} runs after a warm-up)`)
  if (soxMissing) {
    console.log('sox: not installed, no comparison')
  }
  else {
    console.log(`sox FILE -n stats: wall best ${best(soxWall).toFixed(1)} ms, median ${median(soxWall).toFixed(1)} ms (process start included)${soxCpu.length ? `; CPU best ${best(soxCpu).toFixed(0)} ms (GNU time, 10 ms resolution)` : ''}`)
    console.log(`ratio analysis / sox, wall-clock best / best: ${verdict(best(analysisWall) / best(soxWall))}; median / median: ${(median(analysisWall) / median(soxWall)).toFixed(2)}`)
    // For information, not the goal: the process' CPU time also counts V8's background threads
    // (garbage collection after the forced collection before each run, compilation).
    if (soxCpu.length) console.log(`ratio analysis / sox, CPU time best / best (information; includes V8's background threads): ${(best(analysisCpu) / Math.max(best(soxCpu), 1)).toFixed(2)}`)
  }
  if (extraBytes !== null) console.log(`memory ratio: ${(extraBytes / bytes.length).toFixed(2)} × file size (goal ≤ 4) ${extraBytes <= 4 * bytes.length ? 'OK' : 'OVER'}`)
}
finally {
  rmSync(dir, { recursive: true, force: true })
}
