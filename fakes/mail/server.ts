// A stand-in for the shop's mail provider: an SMTP server on 127.0.0.1 that keeps every message under
// a folder and shows an inbox page on its own port. Run alone with `npm run fake:mail`.
import { mkdirSync, readFileSync, readdirSync, writeFileSync, rmSync } from 'node:fs'
import { createServer, type Server } from 'node:http'
import { join } from 'node:path'
import escapeHtml from 'escape-html'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

export interface StoredMessage {
  id: string
  receivedAt: string
  from: string
  to: string[]
  subject: string
  text: string
  html: string
  messageId: string
}

export interface MailFakeOptions {
  smtpPort?: number
  httpPort?: number
  dir?: string
  quiet?: boolean
}

export async function startMailFake(options: MailFakeOptions = {}) {
  const smtpPort = options.smtpPort ?? 2525
  const httpPort = options.httpPort ?? 8025
  const dir = options.dir ?? '.data/mail'
  mkdirSync(dir, { recursive: true })
  let counter = 0

  const list = (): StoredMessage[] => readdirSync(dir).filter(name => name.endsWith('.json')).sort()
    .map(name => JSON.parse(readFileSync(join(dir, name), 'utf8')) as StoredMessage)

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (chunk: Buffer) => chunks.push(chunk))
      stream.on('end', async () => {
        try {
          const raw = Buffer.concat(chunks)
          const parsed = await simpleParser(raw)
          const id = `${Date.now().toString().padStart(15, '0')}-${String(++counter).padStart(5, '0')}`
          const toField = Array.isArray(parsed.to) ? parsed.to : parsed.to ? [parsed.to] : []
          const message: StoredMessage = {
            id,
            receivedAt: new Date().toISOString(),
            from: parsed.from?.text ?? '',
            to: toField.flatMap(address => address.value.map(v => v.address ?? '')),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            messageId: parsed.messageId ?? '',
          }
          writeFileSync(join(dir, `${id}.eml`), raw)
          writeFileSync(join(dir, `${id}.json`), JSON.stringify(message, null, 2))
          if (!options.quiet) console.log(`[mail] ${message.to.join(', ')}: ${message.subject}`)
          callback()
        }
        catch (error) {
          callback(error as Error)
        }
      })
    },
  })

  // A client that drops its connection mid-session (a server killed in a crash test, say) is an
  // 'error' on the SMTP server; without a listener it would end the whole process.
  smtp.on('error', (error: Error) => {
    if (!options.quiet) console.error(`[mail] connection error: ${error.message}`)
  })

  const http: Server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', `http://127.0.0.1:${httpPort}`)
    const send = (status: number, type: string, body: string | Buffer) => {
      res.writeHead(status, { 'content-type': type })
      res.end(body)
    }
    const messages = list()
    if (url.pathname === '/api/messages' && req.method === 'GET') {
      const to = url.searchParams.get('to')?.toLowerCase()
      return send(200, 'application/json', JSON.stringify(to ? messages.filter(m => m.to.some(a => a.toLowerCase() === to)) : messages))
    }
    if (url.pathname === '/api/messages' && req.method === 'DELETE') {
      for (const name of readdirSync(dir)) rmSync(join(dir, name))
      return send(200, 'application/json', '{"deleted":true}')
    }
    const match = /^\/messages\/([\w-]+)(\/raw)?$/.exec(url.pathname)
    if (match) {
      const message = messages.find(m => m.id === match[1])
      if (!message) return send(404, 'text/plain', 'No such message')
      if (match[2]) return send(200, 'text/plain; charset=utf-8', readFileSync(join(dir, `${message.id}.eml`)))
      return send(200, 'text/html; charset=utf-8', page(message.subject, `<p><a href="/">← Inbox</a> · <a href="/messages/${message.id}/raw">raw</a></p>
<dl><dt>From</dt><dd>${escapeHtml(message.from)}</dd><dt>To</dt><dd>${escapeHtml(message.to.join(', '))}</dd><dt>Received</dt><dd>${message.receivedAt}</dd></dl>
<h2>Text</h2><pre>${escapeHtml(message.text)}</pre><h2>HTML</h2><iframe sandbox title="HTML part" srcdoc="${escapeHtml(message.html)}"></iframe>`))
    }
    if (url.pathname === '/') {
      const rows = messages.reverse().map(m => `<tr><td>${m.receivedAt}</td><td>${escapeHtml(m.to.join(', '))}</td><td><a href="/messages/${m.id}">${escapeHtml(m.subject)}</a></td></tr>`).join('')
      return send(200, 'text/html; charset=utf-8', page('Local inbox', `<p>${messages.length} message(s) caught by the local mail stand-in.</p><table><thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead><tbody>${rows}</tbody></table>`))
    }
    send(404, 'text/plain', 'Not found')
  })

  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject)
    smtp.listen(smtpPort, '127.0.0.1', () => resolve())
  })
  await new Promise<void>((resolve, reject) => {
    http.once('error', reject)
    http.listen(httpPort, '127.0.0.1', () => resolve())
  })

  const boundPort = (server: { address(): unknown }, fallback: number) => {
    const address = server.address()
    return typeof address === 'object' && address && 'port' in address ? Number(address.port) : fallback
  }

  return {
    smtpPort: boundPort((smtp as unknown as { server: { address(): unknown } }).server, smtpPort),
    httpPort: boundPort(http, httpPort),
    list,
    async close() {
      await new Promise<void>(resolve => smtp.close(() => resolve()))
      await new Promise<void>(resolve => http.close(() => resolve()))
    },
  }
}

function page(title: string, body: string) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title>
<style>body{font-family:system-ui,sans-serif;margin:2rem;max-width:60rem}table{border-collapse:collapse;width:100%}td,th{border-bottom:1px solid #ddd;padding:.4rem;text-align:left}pre{white-space:pre-wrap;background:#f6f6f6;padding:1rem}iframe{width:100%;height:30rem;border:1px solid #ddd}</style>
</head><body><h1>${escapeHtml(title)}</h1>${body}</body></html>`
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const fake = await startMailFake({
    smtpPort: Number(process.env.MAIL_FAKE_SMTP_PORT ?? 2525),
    httpPort: Number(process.env.MAIL_FAKE_HTTP_PORT ?? 8025),
    dir: process.env.MAIL_FAKE_DIR ?? '.data/mail',
  })
  console.log(`[mail] SMTP on 127.0.0.1:${fake.smtpPort}, inbox at http://127.0.0.1:${fake.httpPort}/`)
  const stop = async () => {
    await fake.close()
    process.exit(0)
  }
  process.on('SIGINT', stop)
  process.on('SIGTERM', stop)
}
