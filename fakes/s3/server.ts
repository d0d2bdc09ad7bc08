// A stand-in for an S3-compatible bucket (s3rver): objects kept under a folder, one bucket made at start,
// requests signed with AWS Signature V4 as for a hosted bucket (it is not a test of credentials: s3rver
// does not refuse a wrong secret). The shop's `s3` uploads driver talks to it exactly as to a
// hosted bucket. Run alone with `npm run fake:s3`; the instances test starts it on a free port.
import { mkdirSync } from 'node:fs'
import type { AddressInfo } from 'node:net'
import { pathToFileURL } from 'node:url'
import S3rver from 's3rver'

/** The key pair of s3rver's built-in account. */
export const s3FakeCredentials = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', region: 'us-east-1' } as const

export interface S3FakeOptions {
  port?: number
  dir?: string
  bucket?: string
  quiet?: boolean
}

export async function startS3Fake(options: S3FakeOptions = {}) {
  const dir = options.dir ?? '.data/s3'
  const bucket = options.bucket ?? 'groovewright-uploads'
  mkdirSync(dir, { recursive: true })
  const server = new S3rver({
    port: options.port ?? 4569,
    address: '127.0.0.1',
    directory: dir,
    silent: options.quiet ?? false,
    configureBuckets: [{ name: bucket, configs: [] }],
  })
  const { port } = await server.run() as AddressInfo
  const endpoint = `http://127.0.0.1:${port}`
  return {
    port,
    endpoint,
    bucket,
    dir,
    /** The settings a server needs to keep its uploads in this bucket (README › Configuration). */
    env: {
      NUXT_UPLOADS_DRIVER: 's3',
      NUXT_UPLOADS_S3_ENDPOINT: endpoint,
      NUXT_UPLOADS_S3_BUCKET: bucket,
      NUXT_UPLOADS_S3_REGION: s3FakeCredentials.region,
      NUXT_UPLOADS_S3_ACCESS_KEY_ID: s3FakeCredentials.accessKeyId,
      NUXT_UPLOADS_S3_SECRET_ACCESS_KEY: s3FakeCredentials.secretAccessKey,
    },
    async close() {
      await server.close()
    },
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const fake = await startS3Fake({
    port: Number(process.env.S3_FAKE_PORT ?? 4569),
    dir: process.env.S3_FAKE_DIR ?? '.data/s3',
  })
  console.log(`[s3] bucket "${fake.bucket}" at ${fake.endpoint} (key ${s3FakeCredentials.accessKeyId} / ${s3FakeCredentials.secretAccessKey})`)
  process.on('SIGINT', async () => {
    await fake.close()
    process.exit(0)
  })
}
