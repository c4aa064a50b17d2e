import type { Logger } from 'pino';
import type { ServerEnv } from '../env';
import { startFakeSmtp, type FakeSmtpServer } from './fake-smtp';
import { createSmtpMailer, type Mailer } from './mailer';

/**
 * The mailer the environment asks for: real SMTP when SMTP_HOST is set; otherwise (MAIL_FAKE=1,
 * or development with no SMTP settings) the local fake server, whose mail /dev/mailbox lists.
 * readEnv refuses MAIL_FAKE with SMTP_HOST, and production with neither.
 */
export async function mailFromEnv(env: ServerEnv, logger: Logger): Promise<{ mailer: Mailer; fake?: FakeSmtpServer }> {
  const publicUrl = env.PUBLIC_URL ?? `http://${env.HOST}:${env.PORT}`;
  if (env.SMTP_HOST) {
    return {
      mailer: createSmtpMailer({
        host: env.SMTP_HOST,
        port: env.SMTP_PORT,
        secure: env.SMTP_SECURE,
        user: env.SMTP_USER,
        password: env.SMTP_PASSWORD,
        from: env.MAIL_FROM,
        publicUrl,
      }),
    };
  }
  const fake = await startFakeSmtp(env.MAIL_FAKE_PORT);
  logger.info(`Mail goes to the local fake SMTP server on 127.0.0.1:${fake.port}; read it at ${publicUrl}/dev/mailbox`);
  return { mailer: createSmtpMailer({ host: fake.host, port: fake.port, secure: false, from: env.MAIL_FROM, publicUrl }), fake };
}
