// The surface-test size limit is a setting (NUXT_PUBLIC_SURFACE_TEST_MAX_MB); here it is 1 MB.
import { url } from '@nuxt/test-utils/e2e'
import { describe, expect, it } from 'vitest'
import { makeSurfaceWav } from '../../server/audio'
import { demoAccounts } from '../../shared/utils/demoAccounts'
import { signedIn, useTestServer } from './harness'

await useTestServer({ NUXT_PUBLIC_SURFACE_TEST_MAX_MB: '1' })

const maker = demoAccounts.find(a => a.role === 'maker')!

async function analyse(cookie: string, bytes: Uint8Array) {
  const form = new FormData()
  form.append('file', new Blob([bytes], { type: 'audio/wav' }), 'take.wav')
  const target = url('/api/workshop/surface-tests/analyse')
  const response = await fetch(target, { method: 'POST', body: form, headers: { origin: new URL(target).origin, accept: 'application/json', cookie } })
  return { status: response.status, body: await response.json() }
}

describe('surface-test upload limit from the settings', () => {
  it('refuses a 1.3 MB recording with 413 naming the limit, and takes a 0.9 MB one', async () => {
    const client = await signedIn(maker.email, maker.password)
    const cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    // 30 s and 20 s of 22.05 kHz 16-bit mono: 1,323,044 and 882,044 bytes.
    const tooBig = await analyse(cookie, makeSurfaceWav({ seconds: 30, sampleRate: 22_050, seed: 1 }))
    expect(tooBig.status).toBe(413)
    expect(tooBig.body.message).toMatch(/larger than 1 MB/)
    const fits = await analyse(cookie, makeSurfaceWav({ seconds: 20, sampleRate: 22_050, seed: 2 }))
    expect(fits.status, JSON.stringify(fits.body)).toBe(200)
    expect(fits.body.durationS).toBeCloseTo(20, 3)
  })
})
