import { describe, expect, it } from 'vitest'
import { formatLine, loggedPath, logSettings } from '../../server/utils/platform/log'

// Common practice, no source: one JSON object a line for collectors, key=value text for people.
describe('operator log lines', () => {
  const time = new Date('2026-03-01T10:00:00.000Z')

  it('is JSON in production and text elsewhere; quiet under tests unless LOG_LEVEL asks', () => {
    expect(logSettings({ NODE_ENV: 'production' })).toEqual({ json: true, level: 'info' })
    expect(logSettings({ NODE_ENV: 'development' })).toEqual({ json: false, level: 'info' })
    expect(logSettings({ NODE_ENV: 'test' })).toEqual({ json: false, level: 'warn' })
    expect(logSettings({ NODE_ENV: 'test', LOG_LEVEL: 'DEBUG' })).toEqual({ json: false, level: 'debug' })
    expect(logSettings({ LOG_LEVEL: 'loud' }).level).toBe('info')
  })

  it('writes the fields it was given and leaves out the missing ones', () => {
    const fields = { method: 'GET', path: '/api/orders/GW26-00001', status: 200, ms: 12, user: undefined, order: 'GW26-00001' }
    expect(JSON.parse(formatLine(true, { time, level: 'info', message: 'request', fields }))).toEqual({
      time: '2026-03-01T10:00:00.000Z', level: 'info', msg: 'request', method: 'GET', path: '/api/orders/GW26-00001', status: 200, ms: 12, order: 'GW26-00001',
    })
    expect(formatLine(false, { time, level: 'info', message: 'request', fields }))
      .toBe('2026-03-01T10:00:00.000Z INFO  request method=GET path=/api/orders/GW26-00001 status=200 ms=12 order=GW26-00001')
    expect(formatLine(false, { time, level: 'error', message: 'job failed', fields: { job: 'mail', error: 'connect ECONNREFUSED' } }))
      .toBe('2026-03-01T10:00:00.000Z ERROR job failed job=mail error="connect ECONNREFUSED"')
  })

  it('hides the values of secret-looking query parameters and keeps the rest', () => {
    expect(loggedPath('/api/orders/GW26-00001?token=abc.def&tab=items')).toBe('/api/orders/GW26-00001?token=…&tab=items')
    expect(loggedPath('/reset?code=123456')).toBe('/reset?code=…')
    expect(loggedPath('/api/auth/reset-request?e%6Dail=a%40b.test')).toBe('/api/auth/reset-request?e%6Dail=…')
    expect(loggedPath('/cylinders?format=2min&page=2')).toBe('/cylinders?format=2min&page=2')
    expect(loggedPath('/api/health')).toBe('/api/health')
  })
})
