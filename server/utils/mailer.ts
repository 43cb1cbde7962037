import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | undefined

export interface OutgoingMail { to: string; subject: string; text: string; html: string }

/** Sends an e-mail through the configured SMTP server (a local catcher in development and tests). */
export async function sendMail(mail: OutgoingMail): Promise<void> {
  const config = useRuntimeConfig()
  if (!transport) {
    const url = config.smtpUrl || process.env.NUXT_SMTP_URL
    if (!url) throw new Error('NUXT_SMTP_URL is not set')
    transport = nodemailer.createTransport(url)
  }
  await transport.sendMail({ from: config.mailFrom, ...mail })
}

/** An absolute link into the app, for e-mails. */
export function appLink(path: string): string {
  const base = (useRuntimeConfig().appUrl || 'http://127.0.0.1:3000').replace(/\/$/, '')
  return `${base}${path}`
}
