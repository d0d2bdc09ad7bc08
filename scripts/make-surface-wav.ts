// Write a synthetic surface-test WAV with known answers (see server/audio/synth.ts).
//
//   npx tsx scripts/make-surface-wav.ts --out f.wav --level -50 --rpm 160 --swell 0.5 \
//     --clicks 12 --seconds 60 --rate 44100 --bits 16 [--float] [--channels 2] [--seed 7]
//     [--colour soft] [--click-level 30] [--extensible]
import { writeFileSync } from 'node:fs'
import { makeSurfaceWav } from '../server/audio/synth'

const usage = `usage: npx tsx scripts/make-surface-wav.ts --out FILE.wav [options]
  --level DBFS       RMS level of the surface noise, AES17 dBFS (default -50)
  --rpm N            speed for the once-per-turn swell (default 160)
  --swell D          swell depth 0…1, noise × (1 + D·sin(2π·rpm/60·t)) (default 0)
  --clicks N         number of clicks (default 0)
  --click-level DB   click peak above the noise RMS (default 30)
  --seconds S        duration (default 60)
  --rate HZ          sample rate (default 44100)
  --bits 16|24|32    integer bit depth (default 16)
  --float            32-bit float samples instead of integers
  --channels 1|2     channels; stereo carries the same signal twice (default 1)
  --colour white|soft  noise colour (default white)
  --extensible       write a WAVE_FORMAT_EXTENSIBLE header
  --seed N           PRNG seed (default 1)`

function numberOption(value: string | undefined, name: string, fallback: number): number {
  if (value === undefined) return fallback
  const parsed = Number(value)
  if (!Number.isFinite(parsed)) throw new Error(`--${name} must be a number, got "${value}"`)
  return parsed
}

const STRING_OPTIONS = ['out', 'level', 'rpm', 'swell', 'clicks', 'click-level', 'seconds', 'rate', 'bits', 'channels', 'colour', 'seed'] as const
const BOOLEAN_OPTIONS = ['float', 'extensible', 'help'] as const
type StringOption = (typeof STRING_OPTIONS)[number]
type BooleanOption = (typeof BOOLEAN_OPTIONS)[number]

/** `--name value` or `--name=value`; values may be negative numbers (node:util parseArgs refuses `--level -50`). */
function parseOptions(args: string[]): Partial<Record<StringOption, string>> & Partial<Record<BooleanOption, boolean>> {
  const values: Partial<Record<StringOption, string>> & Partial<Record<BooleanOption, boolean>> = {}
  for (let i = 0; i < args.length; i++) {
    const arg = args[i]!
    if (arg === '-h') {
      values.help = true
      continue
    }
    if (!arg.startsWith('--')) throw new Error(`unexpected argument "${arg}"`)
    const [name, inline] = arg.slice(2).split(/=(.*)/s, 2) as [string, string | undefined]
    if ((BOOLEAN_OPTIONS as readonly string[]).includes(name)) {
      values[name as BooleanOption] = true
    }
    else if ((STRING_OPTIONS as readonly string[]).includes(name)) {
      const value = inline ?? args[++i]
      if (value === undefined) throw new Error(`--${name} needs a value`)
      values[name as StringOption] = value
    }
    else {
      throw new Error(`unknown option --${name}`)
    }
  }
  return values
}

function main(): void {
  const values = parseOptions(process.argv.slice(2))
  if (values.help || !values.out) {
    console.log(usage)
    process.exit(values.help ? 0 : 1)
  }
  const bits = numberOption(values.bits, 'bits', 16)
  if (bits !== 16 && bits !== 24 && bits !== 32) throw new Error('--bits must be 16, 24 or 32')
  const channels = numberOption(values.channels, 'channels', 1)
  if (channels !== 1 && channels !== 2) throw new Error('--channels must be 1 or 2')
  const colour = values.colour ?? 'white'
  if (colour !== 'white' && colour !== 'soft') throw new Error('--colour must be white or soft')

  const options = {
    levelDbfs: numberOption(values.level, 'level', -50),
    rpm: numberOption(values.rpm, 'rpm', 160),
    swellDepth: numberOption(values.swell, 'swell', 0),
    clicks: Math.round(numberOption(values.clicks, 'clicks', 0)),
    clickLevelDb: numberOption(values['click-level'], 'click-level', 30),
    seconds: numberOption(values.seconds, 'seconds', 60),
    sampleRate: numberOption(values.rate, 'rate', 44100),
    bits,
    sampleFormat: values.float ? ('float' as const) : ('int' as const),
    channels,
    colour,
    extensible: values.extensible ?? false,
    seed: numberOption(values.seed, 'seed', 1),
  } as const
  const bytes = makeSurfaceWav(options)
  writeFileSync(values.out, bytes)
  console.log(
    `${values.out}: ${options.seconds} s, ${options.sampleRate} Hz, ${values.float ? '32-bit float' : `${bits}-bit`}, ${channels === 1 ? 'mono' : 'stereo'}, `
    + `noise ${options.levelDbfs} dBFS, swell ${options.swellDepth} at ${options.rpm} rpm, ${options.clicks} clicks (${bytes.length} bytes)`,
  )
}

try {
  main()
}
catch (error) {
  console.error(error instanceof Error ? error.message : error)
  console.error(usage)
  process.exit(1)
}
