import { testEnv } from './env'

export interface StoredMail { id: string, receivedAt: string, to: string[], subject: string, text: string }

/** Waits for the newest message to an address in the local fake mail service. */
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
