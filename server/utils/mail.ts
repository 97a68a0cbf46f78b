import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | undefined

function useTransport() {
  const config = useRuntimeConfig()
  transport ??= nodemailer.createTransport({
    host: String(config.smtpHost),
    port: Number(config.smtpPort),
    secure: false,
    ignoreTLS: Number(config.smtpPort) !== 587,
  })
  return transport
}

export async function sendMail(message: { to: string, subject: string, text: string }) {
  await useTransport().sendMail({ from: String(useRuntimeConfig().mailFrom), ...message })
}
