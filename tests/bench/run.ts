// `npm run bench`: runs every tests/bench/*.bench.ts in turn and prints what each measured.
import { spawnSync } from 'node:child_process'
import { readdirSync } from 'node:fs'
import { fileURLToPath } from 'node:url'

const dir = fileURLToPath(new URL('.', import.meta.url))
const only = process.argv[2]
const benches = readdirSync(dir).filter(name => name.endsWith('.bench.ts') && (!only || name.includes(only))).sort()
if (benches.length === 0) {
  console.log('No benchmarks matched.')
  process.exit(0)
}
let failed = 0
for (const bench of benches) {
  console.log(`\n=== ${bench} ===`)
  const result = spawnSync(process.execPath, ['--import', 'tsx', '--expose-gc', `${dir}${bench}`], { stdio: 'inherit' })
  if (result.status !== 0) failed++
}
process.exit(failed ? 1 : 0)
