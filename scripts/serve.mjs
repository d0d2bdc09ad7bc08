// `npm run serve`: the built server alone, for running the shop for real (one instance or several behind
// one address). It starts no stand-ins and writes nothing but what its settings name (the database and
// uploads folders, or PostgreSQL and shared storage; the data folder for the backup key). Every setting
// comes from the environment (README › Configuration); a missing or unsafe one stops it here, by name.
import { existsSync } from 'node:fs'
import { resolve } from 'node:path'
import { pathToFileURL } from 'node:url'

const entry = resolve(process.env.GW_OUTPUT_DIR ?? '.output', 'server/index.mjs')
const problems = []
if (!existsSync(entry)) problems.push(`there is no built server at ${entry}: run \`npm run build\` first.`)
if ((process.env.NUXT_SESSION_PASSWORD ?? '').length < 32) {
  problems.push('NUXT_SESSION_PASSWORD must be set, 32 characters or more: it seals the sign-in cookies and signs guests\' order links (every instance needs the same one).')
}
const site = process.env.NUXT_SITE_URL
let siteUrl = null
try {
  siteUrl = site ? new URL(site) : null
}
catch { /* reported below */ }
if (!site) problems.push('NUXT_SITE_URL must be set to the shop\'s public address, e.g. https://cylinders.example.org (links in mails and the Origin check use it).')
else if (!siteUrl || !/^https?:$/.test(siteUrl.protocol) || siteUrl.pathname !== '/' || siteUrl.search || siteUrl.hash) {
  problems.push(`NUXT_SITE_URL must be an http or https address with no path, e.g. https://cylinders.example.org (got "${site}").`)
}
const uploadsDriver = process.env.NUXT_UPLOADS_DRIVER ?? 'fs'
if (!['fs', 's3', 'build'].includes(uploadsDriver)) problems.push(`NUXT_UPLOADS_DRIVER must be fs, s3 or build (got "${uploadsDriver}").`)
if (uploadsDriver === 's3') {
  // Several instances share one bucket; each of these names one part of how to reach it.
  const bucketSettings = {
    NUXT_UPLOADS_S3_ENDPOINT: process.env.NUXT_UPLOADS_S3_ENDPOINT,
    NUXT_UPLOADS_S3_BUCKET: process.env.NUXT_UPLOADS_S3_BUCKET,
    NUXT_UPLOADS_S3_REGION: process.env.NUXT_UPLOADS_S3_REGION,
    NUXT_UPLOADS_S3_ACCESS_KEY_ID: process.env.NUXT_UPLOADS_S3_ACCESS_KEY_ID,
    NUXT_UPLOADS_S3_SECRET_ACCESS_KEY: process.env.NUXT_UPLOADS_S3_SECRET_ACCESS_KEY,
  }
  for (const [name, value] of Object.entries(bucketSettings)) {
    if (!value?.trim()) problems.push(`${name} must be set with NUXT_UPLOADS_DRIVER=s3 (the S3-compatible bucket every instance keeps uploads in).`)
  }
  const endpoint = bucketSettings.NUXT_UPLOADS_S3_ENDPOINT
  if (endpoint && !/^https?:\/\/[^/]/.test(endpoint)) problems.push(`NUXT_UPLOADS_S3_ENDPOINT must be an http or https address (got "${endpoint}").`)
}
if (problems.length > 0) {
  for (const problem of problems) console.error(`[serve] ${problem}`)
  process.exit(1)
}
// A shop run for real starts empty (the first start prints a one-time /setup link) unless told otherwise.
process.env.NUXT_SEED_DEMO ??= process.env.SEED_DEMO ?? 'false'
// The payment service's webhook secret beside a real key, and the checkout hold, are checked by the
// server itself as it starts (server/plugins/checkSettings.ts): it refuses to start on a bad one.
await import(pathToFileURL(entry).href)
