import { and, asc, eq, lte, sql } from 'drizzle-orm'
import escapeHtml from 'escape-html'
import nodemailer from 'nodemailer'
import type { Transporter } from 'nodemailer'
import { mailOutbox } from '../../db/schema'
import type { Database, Transaction } from './db'

export interface MailContent {
  heading: string
  paragraphs: string[]
  action?: { label: string, url: string }
}

/** Plain-text and HTML parts of one message, with the shop's name and address at the foot. */
export function renderMail(content: MailContent, shop: ShopProfile): { text: string, html: string } {
  const footer = [shop.name, ...shop.addressLines, shop.email].filter(Boolean)
  const text = [
    content.heading,
    '',
    ...content.paragraphs.flatMap(p => [p, '']),
    ...(content.action ? [`${content.action.label}: ${content.action.url}`, ''] : []),
    '-- ',
    ...footer,
  ].join('\n')
  const html = `<!doctype html><html><body style="font-family:Georgia,serif;background:#fbf7ef;color:#2e1d10;padding:24px">
<h1 style="font-size:22px;color:#5b3920">${escapeHtml(content.heading)}</h1>
${content.paragraphs.map(p => `<p style="font-size:15px;line-height:1.5">${escapeHtml(p)}</p>`).join('\n')}
${content.action ? `<p><a href="${escapeHtml(content.action.url)}" style="background:#1d5a45;color:#fff;padding:10px 16px;border-radius:6px;text-decoration:none">${escapeHtml(content.action.label)}</a></p>` : ''}
<hr style="border:none;border-top:1px solid #c7a27d;margin-top:32px">
<p style="font-size:12px;color:#5b3920">${footer.map(escapeHtml).join('<br>')}</p>
</body></html>`
  return { text, html }
}

/**
 * Put a message in the outbox, inside the caller's transaction: it exists if and only if the change
 * that caused it was committed. `dedupeKey` makes a repeated change queue it once.
 */
export async function queueMail(tx: Database | Transaction, message: { to: string, subject: string, content: MailContent, dedupeKey?: string }) {
  const shop = await getSetting('shop', tx)
  const { text, html } = renderMail(message.content, shop)
  await tx.insert(mailOutbox).values({
    toAddress: message.to,
    subject: message.subject,
    textBody: text,
    htmlBody: html,
    dedupeKey: message.dedupeKey,
  }).onConflictDoNothing({ target: mailOutbox.dedupeKey })
}

let transporter: Transporter | undefined

function useTransporter(): Transporter {
  if (!transporter) {
    const config = useRuntimeConfig()
    transporter = nodemailer.createTransport({
      host: String(config.smtpHost),
      port: Number(config.smtpPort),
      secure: String(config.smtpSecure) === 'true',
      auth: config.smtpUser ? { user: String(config.smtpUser), pass: String(config.smtpPass) } : undefined,
      connectionTimeout: 5000,
      greetingTimeout: 5000,
      socketTimeout: 10_000,
    })
  }
  return transporter
}

const sendLeaseMs = 5 * 60_000

export function retryDelayMs(attempts: number, maxMs: number): number {
  return Math.min(maxMs, 1000 * 2 ** Math.min(attempts, 20))
}

/**
 * Deliver what is due. Each row is claimed (pending → sending) by a conditional update before it is
 * sent, so two loops never send the same message; a failure puts it back with a later attempt time.
 */
export async function deliverDueMail(limit = 20): Promise<{ sent: number, failed: number }> {
  const db = await useDB()
  const config = useRuntimeConfig()
  const due = await db.select({ id: mailOutbox.id }).from(mailOutbox)
    .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, new Date())))
    .orderBy(asc(mailOutbox.id)).limit(limit)
  let sent = 0
  let failed = 0
  for (const { id } of due) {
    // The claim is a lease: nextAttemptAt becomes the time after which the claim counts as abandoned.
    const [claimed] = await db.update(mailOutbox).set({ status: 'sending', attempts: sql`${mailOutbox.attempts} + 1`, nextAttemptAt: new Date(Date.now() + sendLeaseMs) })
      .where(and(eq(mailOutbox.id, id), eq(mailOutbox.status, 'pending'))).returning()
    if (!claimed) continue
    try {
      await useTransporter().sendMail({
        from: String(config.mailFrom),
        to: claimed.toAddress,
        subject: claimed.subject,
        text: claimed.textBody,
        html: claimed.htmlBody,
        messageId: `<outbox-${claimed.id}-${claimed.createdAt.getTime()}@groovewright.local>`,
      })
      await db.update(mailOutbox).set({ status: 'sent', sentAt: new Date(), lastError: null }).where(eq(mailOutbox.id, id))
      sent++
    }
    catch (error) {
      const wait = retryDelayMs(claimed.attempts, Number(config.mailMaxBackoffMs))
      await db.update(mailOutbox).set({
        status: 'pending',
        nextAttemptAt: new Date(Date.now() + wait),
        lastError: error instanceof Error ? error.message.slice(0, 500) : String(error).slice(0, 500),
      }).where(eq(mailOutbox.id, id))
      failed++
    }
  }
  return { sent, failed }
}

/**
 * A message left `sending` by a crash goes back to the queue once its lease has run out — not before,
 * so another instance that is sending it right now is not doubled.
 */
export async function requeueInterruptedMail(): Promise<number> {
  const db = await useDB()
  const requeued = await db.update(mailOutbox).set({ status: 'pending' })
    .where(and(eq(mailOutbox.status, 'sending'), lte(mailOutbox.nextAttemptAt, new Date()))).returning({ id: mailOutbox.id })
  return requeued.length
}
