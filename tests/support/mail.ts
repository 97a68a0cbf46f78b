import { testEnv } from './env'

export interface StoredMail { id: string, receivedAt: string, to: string[], subject: string, text: string }

/**
 * Waits for the newest message to an address in the local fake mail service. Mail leaves through
 * the outbox after the request has answered: to skip earlier mails to the same address, match on
 * `receivedAfter(time taken before the request)`.
 */
export async function waitForMail(to: string, match: (mail: StoredMail) => boolean = () => true, timeoutMs = 10_000): Promise<StoredMail> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const response = await fetch(`${testEnv().inboxUrl}/api/messages?to=${encodeURIComponent(to)}`)
    const messages = (await response.json()) as StoredMail[]
    const found = messages.find(match)
    if (found) return found
    if (Date.now() > deadline) throw new Error(`no mail to ${to} within ${timeoutMs} ms`)
    await new Promise(r => setTimeout(r, 100))
  }
}

export function linkIn(mail: StoredMail, pathPart: string): string {
  const link = mail.text.match(new RegExp(`https?://\\S*${pathPart}\\S*`))?.[0]
  if (!link) throw new Error(`no ${pathPart} link in mail "${mail.subject}"`)
  return link
}

/** Polls until `read` gives a value that `done` accepts (e.g. an offer's mail state), or fails with the last value. */
export async function waitUntil<T>(read: () => Promise<T>, done: (value: T) => boolean, timeoutMs = 15_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await read()
    if (done(value)) return value
    if (Date.now() > deadline) throw new Error(`condition not met within ${timeoutMs} ms; last value: ${JSON.stringify(value)}`)
    await new Promise(r => setTimeout(r, 200))
  }
}

export interface CapturedMail { to: string[], raw: string }

/** A throw-away SMTP server inside the test, to bring "the mail service" up and down at will. */
export async function startCapturingSmtp(port: number) {
  const { SMTPServer } = await import('smtp-server')
  const received: CapturedMail[] = []
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      let raw = ''
      stream.on('data', (chunk: Buffer) => (raw += chunk.toString()))
      stream.on('end', () => {
        received.push({ to: session.envelope.rcptTo.map(r => r.address), raw })
        callback()
      })
    },
  })
  await new Promise<void>(done => server.listen(port, '127.0.0.1', done))
  return { received, close: () => new Promise<void>(done => server.close(() => done())) }
}

/** A match for waitForMail: only mail received at or after `since` (taken before the request that sends it). */
export function receivedAfter(since: Date, match: (mail: StoredMail) => boolean = () => true) {
  return (mail: StoredMail) => new Date(mail.receivedAt).getTime() >= since.getTime() && match(mail)
}
