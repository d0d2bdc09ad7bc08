// s3rver ships no types; the part of its API the stand-in uses.
declare module 's3rver' {
  import type { AddressInfo } from 'node:net'

  interface S3rverOptions {
    port?: number
    address?: string
    directory?: string
    silent?: boolean
    configureBuckets?: { name: string, configs: string[] }[]
  }

  export default class S3rver {
    constructor(options: S3rverOptions)
    run(): Promise<AddressInfo>
    close(): Promise<void>
  }
}
