import { createConsola } from 'consola'
import type { ConsolaInstance, LogObject } from 'consola'

/*
 * The server's operator log: one line per request and one per background-job run. JSON lines (one object
 * a line, for a log collector) when NODE_ENV is `production`, readable text otherwise. LOG_LEVEL chooses
 * how much: `silent`, `error`, `warn`, `info` (the default) or `debug` (adds the mail loop's idle passes);
 * under NODE_ENV=test the default is `warn`, so test runs stay quiet unless asked.
 */
export type LogFields = Record<string, string | number | boolean | null | undefined>

const levels = { silent: -999, error: 0, warn: 1, info: 3, debug: 4 } as const
type LevelName = keyof typeof levels

// Read by key: the build replaces `process.env.NODE_ENV` with a constant, and this must be the running one.
const runningEnv = () => ({ NODE_ENV: process.env['NODE_ENV'], LOG_LEVEL: process.env.LOG_LEVEL })

export function logSettings(env: { NODE_ENV?: string, LOG_LEVEL?: string } = runningEnv()): { json: boolean, level: LevelName } {
  const nodeEnv = env.NODE_ENV
  const asked = String(env.LOG_LEVEL ?? '').toLowerCase()
  const level = asked in levels ? asked as LevelName : nodeEnv === 'test' ? 'warn' : 'info'
  return { json: nodeEnv === 'production', level }
}

/** One line: `time level message key=value …` as text, or `{"time", "level", "msg", …fields}` as JSON. */
export function formatLine(json: boolean, entry: { time: Date, level: string, message: string, fields: LogFields }): string {
  const fields = Object.fromEntries(Object.entries(entry.fields).filter(([, value]) => value !== undefined))
  if (json) return JSON.stringify({ time: entry.time.toISOString(), level: entry.level, msg: entry.message, ...fields })
  const pairs = Object.entries(fields).map(([key, value]) => `${key}=${typeof value === 'string' && /[\s"=]/.test(value) ? JSON.stringify(value) : value}`)
  return [entry.time.toISOString(), entry.level.toUpperCase().padEnd(5), entry.message, ...pairs].join(' ')
}

function reporterFor(json: boolean) {
  return {
    log(logObj: LogObject) {
      const [message, fields] = logObj.args as [unknown, LogFields | undefined]
      const text = message instanceof Error ? message.message : String(message)
      const line = formatLine(json, { time: logObj.date, level: logObj.type === 'log' ? 'info' : logObj.type, message: text, fields: fields ?? {} })
      // Text: problems on stderr, the rest on stdout. JSON: every line on stdout, for one collector.
      const stream = !json && logObj.level <= levels.warn ? process.stderr : process.stdout
      stream.write(`${line}\n`)
    },
  }
}

let instance: ConsolaInstance | undefined

export function useLog(): ConsolaInstance {
  if (!instance) {
    const { json, level } = logSettings()
    instance = createConsola({ level: levels[level], reporters: [reporterFor(json)] })
  }
  return instance
}

/** Query parameters whose values never reach the log: signed links, tokens, codes. */
const secretParameter = /token|sig|signature|secret|key|code|password|session|email/i

/** The request path with the values of secret-looking query parameters replaced by `…`. */
export function loggedPath(path: string): string {
  const at = path.indexOf('?')
  if (at < 0) return path
  const query = path.slice(at + 1).split('&').map((pair) => {
    const [name = '', ...rest] = pair.split('=')
    return rest.length && secretParameter.test(decodeURIComponentSafe(name)) ? `${name}=…` : pair
  })
  return `${path.slice(0, at)}?${query.join('&')}`
}

function decodeURIComponentSafe(text: string): string {
  try {
    return decodeURIComponent(text)
  }
  catch {
    return text
  }
}

/** One background-job run: what it did and how long it took. Idle runs of frequent jobs go at debug level. */
export function logJob(job: string, startedAt: number, outcome: LogFields & { error?: string }, options: { idle?: boolean } = {}) {
  const fields = { job, ms: Math.round(performance.now() - startedAt), ...outcome }
  if (outcome.error) useLog().error('job failed', fields)
  else if (options.idle) useLog().debug('job', fields)
  else useLog().info('job', fields)
}
