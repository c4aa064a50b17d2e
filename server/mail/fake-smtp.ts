import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface ReceivedMail {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  headers: Record<string, string>;
}

export interface FakeSmtpServer {
  host: string;
  port: number;
  /** Newest last. */
  messages: ReceivedMail[];
  /** Messages addressed to `address`, newest last. */
  to(address: string): ReceivedMail[];
  clear(): void;
  close(): Promise<void>;
}

/** Keep at most this many messages, so a long-running dev server does not grow without end. */
const MAX_KEPT = 500;

/**
 * A local SMTP server on loopback that keeps what it receives in memory: the start command,
 * dev server and tests send real SMTP to it, and /dev/mailbox lists it.
 */
export async function startFakeSmtp(port = 0): Promise<FakeSmtpServer> {
  const messages: ReceivedMail[] = [];
  let next = 1;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    banner: 'Sympodia fake mail server',
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const headers: Record<string, string> = {};
          for (const line of parsed.headerLines) headers[line.key] = line.line.slice(line.line.indexOf(':') + 1).trim();
          messages.push({
            id: next++,
            receivedAt: new Date().toISOString(),
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to: session.envelope.rcptTo.map((r) => r.address.toLowerCase()),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            headers,
          });
          if (messages.length > MAX_KEPT) messages.splice(0, messages.length - MAX_KEPT);
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = (server.server.address() as AddressInfo).port;
  return {
    host: '127.0.0.1',
    port: address,
    messages,
    to: (email) => messages.filter((m) => m.to.includes(email.toLowerCase())),
    clear: () => void messages.splice(0, messages.length),
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
