import nodemailer from 'nodemailer';

export type MailMessageInput = { to: string; subject: string; text: string };
export type Mailer = { send(message: MailMessageInput): Promise<void>; close(): void };

/** The only place that talks SMTP. Locally it points at the SMTP fake; beyond one machine, at a hosted service. */
export function createMailer(smtpUrl: string, from: string): Mailer {
  const transport = nodemailer.createTransport(smtpUrl, {
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 10_000,
  } as never);
  return {
    async send(message) {
      await transport.sendMail({ from, to: message.to, subject: message.subject, text: message.text });
    },
    close() {
      transport.close();
    },
  };
}

/** Reads the local SMTP fake's inbox (only when DEV_INBOX_URL is set). */
export async function readDevInbox(devInboxUrl: string) {
  const res = await fetch(`${devInboxUrl}/messages`, { signal: AbortSignal.timeout(3_000) });
  if (!res.ok) throw new Error(`dev inbox answered ${res.status}`);
  return (await res.json()) as { messages: Array<{ id: string; to: string; subject: string; text: string; date: string }> };
}
