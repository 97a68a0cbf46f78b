// Local stand-in for a mail provider: accepts everything the app sends over SMTP, keeps each
// message as a JSON file and shows them in a small web inbox. Tests read links from its API.
// Why our own and not a mail catcher from npm: maildev 3.0.0 (tried 2026-12-02) declares Node >= 20 itself, but
// installs 265 packages (112 MB: React, fastify, socket.io, jsdom, an MCP SDK, a second nodemailer and zod), and two
// of them, content-disposition 3.1.0 and cookie 2.0.2, declare Node >= 22. This file needs only smtp-server and
// mailparser, which the app already has.
import { randomBytes } from 'node:crypto'
import { mkdir, readdir, readFile, rename, rm, writeFile } from 'node:fs/promises'
import { createServer } from 'node:http'
import { join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

const HOST = '127.0.0.1'
const SMTP_PORT = Number(process.env.SMTP_PORT || 1025)
const INBOX_PORT = Number(process.env.INBOX_PORT || 1080)
const MAIL_DIR = resolve(process.env.MAIL_DIR || fileURLToPath(new URL('../storage/mail', import.meta.url)))
const MAX_MESSAGE_BYTES = 25 * 1024 * 1024
const ID_PATTERN = /^[0-9a-f]{16}$/

await mkdir(MAIL_DIR, { recursive: true })

// --- storage ---------------------------------------------------------------------------

function recipientsOf(session, parsed) {
  const fromEnvelope = session.envelope.rcptTo.map(r => r.address)
  if (fromEnvelope.length) return fromEnvelope
  const headers = [parsed.to, parsed.cc].flat().filter(Boolean)
  return headers.flatMap(h => h.value.map(v => v.address).filter(Boolean))
}

async function storeMessage(session, parsed) {
  const id = randomBytes(8).toString('hex')
  const now = new Date()
  const message = {
    id,
    receivedAt: now.toISOString(),
    from: parsed.from?.text || session.envelope.mailFrom?.address || '',
    to: recipientsOf(session, parsed),
    subject: parsed.subject || '',
    text: parsed.text || '',
    html: parsed.html || null,
  }
  const name = `${now.getTime()}-${id}.json`
  // Write then rename, so a reader never sees half a message.
  const tmp = join(MAIL_DIR, `.${name}.tmp`)
  await writeFile(tmp, JSON.stringify(message, null, 2))
  await rename(tmp, join(MAIL_DIR, name))
  return message
}

async function messageFiles() {
  const names = await readdir(MAIL_DIR).catch(() => [])
  return names.filter(n => /^\d+-[0-9a-f]{16}\.json$/.test(n))
}

async function listMessages(to) {
  const files = await messageFiles()
  const messages = []
  for (const name of files) {
    try {
      messages.push(JSON.parse(await readFile(join(MAIL_DIR, name), 'utf8')))
    }
    catch {
      // Deleted between readdir and readFile (a concurrent clear): skip it.
    }
  }
  messages.sort((a, b) => b.receivedAt.localeCompare(a.receivedAt) || b.id.localeCompare(a.id))
  if (!to) return messages
  const wanted = to.trim().toLowerCase()
  return messages.filter(m => m.to.some(address => address.toLowerCase() === wanted))
}

async function findMessage(id) {
  if (!ID_PATTERN.test(id)) return null
  const name = (await messageFiles()).find(n => n.endsWith(`-${id}.json`))
  if (!name) return null
  try {
    return JSON.parse(await readFile(join(MAIL_DIR, name), 'utf8'))
  }
  catch {
    return null
  }
}

async function clearMessages() {
  const files = await messageFiles()
  await Promise.all(files.map(n => rm(join(MAIL_DIR, n), { force: true })))
  return files.length
}

// --- SMTP ------------------------------------------------------------------------------

const smtp = new SMTPServer({
  secure: false,
  authOptional: true,
  disabledCommands: ['STARTTLS', 'AUTH'],
  banner: 'Fintrail local mail',
  size: MAX_MESSAGE_BYTES,
  logger: false,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then(async (parsed) => {
        if (stream.sizeExceeded) {
          const error = new Error('Message too large')
          error.responseCode = 552
          throw error
        }
        const message = await storeMessage(session, parsed)
        console.log(`mail: "${message.subject}" to ${message.to.join(', ')}`)
        callback()
      })
      .catch((error) => {
        console.error('mail: could not store a message:', error.message)
        callback(error)
      })
  },
})
smtp.on('error', error => console.error('mail: SMTP error:', error.message))

// --- inbox over HTTP -------------------------------------------------------------------

function escapeHtml(value) {
  return String(value)
    .replaceAll('&', '&amp;')
    .replaceAll('<', '&lt;')
    .replaceAll('>', '&gt;')
    .replaceAll('"', '&quot;')
    .replaceAll('\'', '&#39;')
}

// Escapes every piece and turns bare http(s) URLs into links; trailing punctuation stays text.
function linkify(text) {
  const urlPattern = /https?:\/\/[^\s<>"']+/g
  let html = ''
  let last = 0
  for (const match of text.matchAll(urlPattern)) {
    const url = match[0].replace(/[.,;:!?)\]]+$/, '')
    html += escapeHtml(text.slice(last, match.index))
    html += `<a href="${escapeHtml(url)}">${escapeHtml(url)}</a>`
    last = match.index + url.length
  }
  return html + escapeHtml(text.slice(last))
}

const shownTime = iso => `${iso.slice(0, 19).replace('T', ' ')} UTC`

function page(title, body) {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
  body { font: 16px/1.5 system-ui, sans-serif; margin: 0 auto; max-width: 60rem; padding: 1rem 1.5rem; color: #1f2933; }
  h1 { font-size: 1.4rem; } a { color: #0b6e6e; }
  table { border-collapse: collapse; width: 100%; } th, td { text-align: left; padding: .5rem; border-bottom: 1px solid #d9e2ec; vertical-align: top; }
  .muted { color: #52606d; font-size: .9rem; }
  pre { white-space: pre-wrap; word-break: break-word; background: #f5f7fa; padding: 1rem; border-radius: .4rem; }
  iframe { width: 100%; min-height: 30rem; border: 1px solid #d9e2ec; border-radius: .4rem; }
  button { font: inherit; padding: .3rem .8rem; }
</style></head><body>${body}</body></html>`
}

function inboxPage(messages) {
  const rows = messages.map(m => `<tr>
    <td class="muted">${escapeHtml(shownTime(m.receivedAt))}</td>
    <td>${escapeHtml(m.to.join(', '))}</td>
    <td><a href="/messages/${m.id}">${escapeHtml(m.subject || '(no subject)')}</a></td>
  </tr>`).join('')
  const list = messages.length
    ? `<table><thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead><tbody>${rows}</tbody></table>`
    : '<p>No messages yet. Mail the app sends shows up here.</p>'
  return page('Local inbox', `<h1>Local inbox</h1>
    <p class="muted">${messages.length} message(s), newest first. Nothing here leaves this machine.</p>
    <form method="post" action="/clear"><button>Delete all</button></form>${list}`)
}

function messagePage(m) {
  const html = m.html
    ? `<h2>HTML version</h2><iframe sandbox title="HTML version" srcdoc="${escapeHtml(m.html)}"></iframe>`
    : ''
  return page(m.subject || 'Message', `<p><a href="/">&larr; Inbox</a></p>
    <h1>${escapeHtml(m.subject || '(no subject)')}</h1>
    <p class="muted">From ${escapeHtml(m.from)}<br>To ${escapeHtml(m.to.join(', '))}<br>
    Received ${escapeHtml(shownTime(m.receivedAt))}</p>
    <pre>${linkify(m.text)}</pre>${html}`)
}

function send(res, status, type, body) {
  res.writeHead(status, {
    'content-type': type,
    'cache-control': 'no-store',
    // The mail's own HTML runs only in a sandboxed frame; the page itself needs nothing remote.
    'content-security-policy': 'default-src \'none\'; style-src \'unsafe-inline\'; img-src data:; form-action \'self\'',
  })
  res.end(body)
}
const sendJson = (res, status, value) => send(res, status, 'application/json; charset=utf-8', JSON.stringify(value))
const sendHtml = (res, status, html) => send(res, status, 'text/html; charset=utf-8', html)

async function route(req, res) {
  const url = new URL(req.url, `http://${HOST}:${INBOX_PORT}`)
  const path = url.pathname.replace(/\/+$/, '') || '/'
  const method = req.method
  const idMatch = path.match(/^\/(?:api\/)?messages\/([^/]+)$/)

  if (path === '/api/messages' && method === 'GET') {
    return sendJson(res, 200, await listMessages(url.searchParams.get('to')))
  }
  if (path === '/api/messages' && method === 'DELETE') {
    return sendJson(res, 200, { deleted: await clearMessages() })
  }
  if (idMatch && path.startsWith('/api/') && method === 'GET') {
    const message = await findMessage(idMatch[1])
    return message ? sendJson(res, 200, message) : sendJson(res, 404, { error: 'No such message' })
  }
  if (path === '/' && method === 'GET') {
    return sendHtml(res, 200, inboxPage(await listMessages(url.searchParams.get('to'))))
  }
  if (path === '/clear' && method === 'POST') {
    // Another site's form must not empty the inbox: browsers send Origin on cross-site posts.
    const origin = req.headers.origin
    if (origin && origin !== `http://${HOST}:${INBOX_PORT}` && origin !== `http://localhost:${INBOX_PORT}`) {
      return sendJson(res, 403, { error: 'Cross-site request refused' })
    }
    await clearMessages()
    res.writeHead(303, { location: '/' })
    return res.end()
  }
  if (idMatch && method === 'GET') {
    const message = await findMessage(idMatch[1])
    return message
      ? sendHtml(res, 200, messagePage(message))
      : sendHtml(res, 404, page('Not found', '<p>No such message. <a href="/">Inbox</a></p>'))
  }
  return sendJson(res, 404, { error: 'Not found' })
}

const inbox = createServer((req, res) => {
  route(req, res).catch((error) => {
    console.error('mail: inbox error:', error)
    if (!res.headersSent) sendJson(res, 500, { error: 'Inbox error' })
    else res.end()
  })
})

// --- lifecycle -------------------------------------------------------------------------

function listen(server, port, label) {
  return new Promise((resolveListen, reject) => {
    server.once('error', (error) => {
      reject(new Error(`${label} could not listen on ${HOST}:${port}: ${error.code || error.message}`))
    })
    server.listen(port, HOST, resolveListen)
  })
}

try {
  await listen(smtp.server, SMTP_PORT, 'SMTP')
  await listen(inbox, INBOX_PORT, 'Inbox')
}
catch (error) {
  console.error(`mail: ${error.message}`)
  process.exit(1)
}
console.log(`mail: SMTP on ${HOST}:${SMTP_PORT}, inbox on http://${HOST}:${INBOX_PORT}, files in ${MAIL_DIR}`)

let stopping = false
function shutdown(signal) {
  if (stopping) return
  stopping = true
  console.log(`mail: ${signal} received, stopping`)
  // Keep-alive sockets would hold close() open; a short grace period is enough for a fake.
  setTimeout(() => process.exit(0), 3000).unref()
  inbox.closeAllConnections?.()
  inbox.close(() => smtp.close(() => process.exit(0)))
}
process.on('SIGINT', () => shutdown('SIGINT'))
process.on('SIGTERM', () => shutdown('SIGTERM'))
