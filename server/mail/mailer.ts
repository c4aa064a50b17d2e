import nodemailer from 'nodemailer';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
  headers?: Record<string, string>;
}

/** Sends mail; the only way the server reaches an SMTP server. */
export interface Mailer {
  send(message: MailMessage): Promise<void>;
  /** Base of the links mails carry, e.g. "http://127.0.0.1:8790". */
  publicUrl: string;
}

export interface SmtpSettings {
  host: string;
  port: number;
  secure: boolean;
  user?: string;
  password?: string;
  from: string;
  publicUrl: string;
}

export function createSmtpMailer(settings: SmtpSettings): Mailer {
  const transport = nodemailer.createTransport({
    host: settings.host,
    port: settings.port,
    secure: settings.secure,
    auth: settings.user ? { user: settings.user, pass: settings.password ?? '' } : undefined,
    // The fake server on loopback speaks plain SMTP; a real one is reached with STARTTLS if offered.
    ignoreTLS: settings.host === '127.0.0.1' && !settings.user,
  });
  return {
    publicUrl: settings.publicUrl.replace(/\/$/, ''),
    async send(message) {
      await transport.sendMail({ from: settings.from, ...message });
    },
  };
}

/** Escapes text for HTML mail bodies and pages. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}
