// The stand-in's own hosted checkout page: plain HTML forms, no scripts, no outside resources, and a
// deliberately neutral look of its own (it must not pass for the real service).
import type { CheckoutSession, LineItem } from './state'
import escapeHtml from 'escape-html'
import { formatAmount } from './util'

export const PAGE_TITLE = 'Local test checkout — no real money moves'

/** The address a completed session sends the customer to, with `{CHECKOUT_SESSION_ID}` filled in. */
export function successUrlFor(session: CheckoutSession) {
  return (session.success_url ?? '').replaceAll('{CHECKOUT_SESSION_ID}', session.id).replaceAll('%7BCHECKOUT_SESSION_ID%7D', session.id)
}

function localeOf(session: CheckoutSession) {
  const wanted = session.locale && session.locale !== 'auto' ? session.locale : 'en-GB'
  try {
    return Intl.NumberFormat.supportedLocalesOf([wanted]).length ? wanted : 'en-GB'
  }
  catch {
    return 'en-GB'
  }
}

function summary(session: CheckoutSession, items: LineItem[]) {
  const locale = localeOf(session)
  const money = (amount: number) => formatAmount(amount, session.currency, locale)
  const rows = items.map(item => `<tr>
<th scope="row">${escapeHtml(item.product_data.name)}${item.product_data.description ? `<span class="muted">${escapeHtml(item.product_data.description)}</span>` : ''}<span class="muted">${money(item.price.unit_amount)} each</span></th>
<td class="num">${item.quantity}</td>
<td class="num">${money(item.amount_total)}</td>
</tr>`).join('\n')
  const shipping = session.total_details.amount_shipping
    ? `<tr><th scope="row" colspan="2">Shipping</th><td class="num">${money(session.total_details.amount_shipping)}</td></tr>`
    : ''
  return `<table>
<caption>Order summary</caption>
<thead><tr><th scope="col">Item</th><th scope="col" class="num">Quantity</th><th scope="col" class="num">Amount</th></tr></thead>
<tbody>
${rows}
</tbody>
<tfoot>
<tr><th scope="row" colspan="2">Subtotal</th><td class="num">${money(session.amount_subtotal)}</td></tr>
${shipping}
<tr class="total"><th scope="row" colspan="2">Total due</th><td class="num" id="total">${money(session.amount_total)}</td></tr>
</tfoot>
</table>`
}

function details(session: CheckoutSession) {
  const expires = new Date(session.expires_at * 1000)
  return `<dl class="details">
${session.customer_email ? `<div><dt>E-mail</dt><dd>${escapeHtml(session.customer_email)}</dd></div>` : ''}
<div><dt>Session</dt><dd><code>${escapeHtml(session.id)}</code></dd></div>
<div><dt>Open until</dt><dd><time datetime="${expires.toISOString()}">${escapeHtml(expires.toUTCString())}</time></dd></div>
</dl>`
}

const actions = (session: CheckoutSession, which: ('pay' | 'decline' | 'cancel')[]) => {
  const label = { pay: 'Pay', decline: 'Decline card', cancel: 'Cancel' }
  const hint = {
    pay: 'Completes the payment as if the card was accepted.',
    decline: 'Fails the payment as if the bank declined the card; you can try again.',
    cancel: 'Leaves without paying and returns to the shop.',
  }
  return `<div class="actions">
${which.map(action => `<form method="post" action="/pay/${encodeURIComponent(session.id)}/${action}">
<button type="submit" class="${action}" aria-describedby="hint-${action}">${label[action]}</button>
<p class="hint" id="hint-${action}">${hint[action]}</p>
</form>`).join('\n')}
</div>`
}

/** The page at the session's `url`, according to its state. */
export function checkoutPage(session: CheckoutSession, items: LineItem[]) {
  if (session.status === 'complete') {
    return layout('Payment received', `<p class="notice ok" role="status">This checkout is complete: the payment was received.</p>
${summary(session, items)}
${session.success_url ? `<p><a href="${escapeHtml(successUrlFor(session))}">Return to the shop</a></p>` : ''}`)
  }
  if (session.status === 'expired') {
    return layout('This checkout has expired', `<p class="notice" role="status">This checkout session has expired. Nothing was charged; start again from the shop.</p>
${summary(session, items)}
${session.cancel_url ? `<p><a href="${escapeHtml(session.cancel_url)}">Return to the shop</a></p>` : ''}`)
  }
  return layout('Check out', `${summary(session, items)}
${details(session)}
<p class="muted">Choose what the pretend card does. No card details are asked for; nothing leaves this computer.</p>
${actions(session, ['pay', 'decline', 'cancel'])}`)
}

export function declinedPage(session: CheckoutSession, items: LineItem[]) {
  return layout('Card declined', `<div class="notice bad" role="alert"><p><strong>Your card was declined.</strong> No money was taken. You can try again or cancel.</p></div>
${summary(session, items)}
<div class="actions">
<p><a class="button" href="/pay/${encodeURIComponent(session.id)}">Try again</a></p>
<form method="post" action="/pay/${encodeURIComponent(session.id)}/cancel"><button type="submit" class="cancel">Cancel</button></form>
</div>`)
}

export function messagePage(heading: string, text: string, link?: { href: string, label: string }) {
  return layout(heading, `<p class="notice" role="status">${escapeHtml(text)}</p>${link ? `<p><a href="${escapeHtml(link.href)}">${escapeHtml(link.label)}</a></p>` : ''}`)
}

function layout(heading: string, body: string) {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<title>${escapeHtml(heading)} · ${escapeHtml(PAGE_TITLE)}</title>
<style>
:root{color-scheme:light;--ink:#1f2328;--muted:#57606a;--line:#d0d7de;--paper:#fbfaf7;--card:#fff;--accent:#1d4e89;--bad:#8b1a1a;--ok:#1f5f2e}
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:16px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif}
.banner{background:#fff3c4;border-bottom:2px dashed #8a6d00;color:#3d3000;padding:.6rem 1rem;text-align:center;font-weight:600}.banner p{margin:0}
main{max-width:40rem;margin:1.5rem auto;padding:0 1rem}
.card{background:var(--card);border:1px solid var(--line);border-radius:6px;padding:1.25rem}
h1{font-size:1.4rem;margin:0 0 1rem}
table{width:100%;border-collapse:collapse;margin:0 0 1rem}
caption{text-align:left;font-weight:600;padding-bottom:.4rem}
th,td{padding:.45rem .3rem;border-bottom:1px solid var(--line);text-align:left;vertical-align:top}
th[scope=row]{font-weight:400}
.num{text-align:right;white-space:nowrap}
.total th,.total td{font-weight:700;border-bottom:2px solid var(--ink)}
.muted{color:var(--muted);display:block;font-size:.9rem}
.details{display:grid;gap:.2rem;margin:0 0 1rem;font-size:.9rem}
.details div{display:flex;gap:.5rem}.details dt{color:var(--muted);min-width:6.5rem}.details dd{margin:0;word-break:break-all}
.actions{display:grid;gap:.75rem;margin-top:1rem}
.actions form{margin:0}
.hint{margin:.25rem 0 0;color:var(--muted);font-size:.85rem}
button,.button{display:inline-block;min-width:10rem;padding:.65rem 1.1rem;font:inherit;font-weight:600;border-radius:4px;border:2px solid var(--ink);cursor:pointer;text-decoration:none;text-align:center}
button.pay{background:var(--accent);border-color:var(--accent);color:#fff}
button.decline{background:#fff;border-color:var(--bad);color:var(--bad)}
button.cancel,.button{background:#fff;color:var(--ink)}
button:focus-visible,a:focus-visible{outline:3px solid #c26d00;outline-offset:2px}
a{color:var(--accent)}
.notice{border-left:4px solid var(--muted);background:#f2f2ee;padding:.6rem .8rem;margin:0 0 1rem}
.notice p{margin:0}.notice.bad{border-color:var(--bad);background:#fbeaea}.notice.ok{border-color:var(--ok);background:#e9f5ec}
footer{max-width:40rem;margin:0 auto 2rem;padding:0 1rem;color:var(--muted);font-size:.85rem}
@media (max-width:30rem){main{padding:0 .5rem;margin-top:1rem}.card{padding:.9rem}th,td{padding:.4rem .2rem}.details div{flex-direction:column;gap:0}}
</style>
</head>
<body>
<header class="banner"><p>${escapeHtml(PAGE_TITLE)}</p></header>
<main><div class="card">
<h1>${escapeHtml(heading)}</h1>
${body}
</div></main>
<footer>A stand-in for the payment service, for development and tests only.</footer>
</body>
</html>`
}
