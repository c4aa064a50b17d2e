import { Router } from 'express';
import type { FakeSmtpServer } from '../mail/fake-smtp';
import { linksIn } from '../mail/links';
import { escapeHtml } from '../mail/mailer';
import { loopbackClientsOnly } from '../middleware/loopback';

/**
 * The development mailbox: what the fake SMTP server received, newest first, with the links
 * clickable. Mounted only when the fake mail server is in use (MAIL_FAKE=1), never with SMTP_HOST,
 * and answers only clients on this machine: its reset, invitation and hand-off links are credentials.
 */
export function mailboxRoutes(fake: FakeSmtpServer): Router {
  const router = Router();
  router.use('/dev/mailbox', loopbackClientsOnly);
  router.use('/dev/mailbox.json', loopbackClientsOnly);
  router.get('/dev/mailbox.json', (_req, res) => {
    res.set('Cache-Control', 'no-store');
    res.json({ messages: [...fake.messages].reverse() });
  });
  router.get('/dev/mailbox', (_req, res) => {
    const items = [...fake.messages].reverse().map((m) => {
      let body = escapeHtml(m.text);
      for (const link of new Set(linksIn(m.text))) {
        const safe = escapeHtml(link);
        body = body.split(safe).join(`<a href="${safe}">${safe}</a>`);
      }
      return `<article data-testid="mail-${m.id}">
<h2>${escapeHtml(m.subject)}</h2>
<p class="meta">To ${escapeHtml(m.to.join(', '))} · ${escapeHtml(m.receivedAt)}</p>
<pre>${body}</pre>
</article>`;
    });
    res.set('Cache-Control', 'no-store');
    res.type('html').send(`<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Sympodia dev mailbox</title>
<style>body{font-family:system-ui,sans-serif;max-width:46rem;margin:1rem auto;padding:0 1rem;color:#1c2a22}
article{border:1px solid #9aa89f;border-radius:8px;padding:0.75rem 1rem;margin:1rem 0}
h2{font-size:1.1rem;margin:0 0 .25rem}.meta{color:#3d4a42;margin:0 0 .5rem}pre{white-space:pre-wrap;font-family:inherit}
a{color:#1d5b8f;word-break:break-all}</style></head>
<body><h1>Dev mailbox</h1>
<p>Mail the server sent to the local fake SMTP server, newest first. Nothing here left this machine. Reload to see new mail.</p>
${items.length ? items.join('\n') : '<p data-testid="mailbox-empty">No mail yet.</p>'}
</body></html>`);
  });
  return router;
}
