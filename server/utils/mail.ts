import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | undefined

function useTransport() {
  const config = useRuntimeConfig()
  transport ??= nodemailer.createTransport({
    host: String(config.smtpHost),
    port: Number(config.smtpPort),
    secure: false,
    ignoreTLS: Number(config.smtpPort) !== 587,
    // The outbox worker retries: a mail server that hangs must not hold a job for minutes.
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  })
  return transport
}

/** Sends now. Routes do not call this: they use queueMail (server/utils/mail-outbox.ts). */
export async function sendMail(message: { to: string, subject: string, text: string, html?: string }) {
  await useTransport().sendMail({ from: String(useRuntimeConfig().mailFrom), ...message })
}
