import http from 'node:http';
import express from 'express';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';

/** One received message as the inbox keeps it (and as GET /api/messages lists it). */
export interface InboxMessage {
  id: string;
  receivedAt: string;
  envelope: { from: string; to: string[] };
  messageId: string | null;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  attachments: { filename: string | null; contentType: string; method: string | null; content: string }[];
  headers: Record<string, string>;
}

export interface FakeSmtpInbox {
  smtpUrl: string;
  url: string;
  messages: InboxMessage[];
  clear(): void;
  stop(): Promise<void>;
}

const esc = (s: unknown) => String(s ?? '').replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/**
 * A local SMTP server that accepts every message, keeps it in memory and shows it on a small inbox
 * page, so e-mail can be read without sending any. Loopback only, no TLS, no auth.
 * POST /api/fail-next {"count": n} makes the next n messages fail with 451 (for retry tests).
 */
export async function startFakeSmtpInbox(ports: { smtp: number; web: number }): Promise<FakeSmtpInbox> {
  const messages: InboxMessage[] = [];
  let failNext = 0;
  let seq = 0;

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        if (failNext > 0) {
          failNext -= 1;
          const err = Object.assign(new Error('Try again later (fake inbox told to fail)'), { responseCode: 451 });
          return callback(err);
        }
        simpleParser(Buffer.concat(chunks)).then(
          (mail) => {
            seq += 1;
            const addresses = (v: typeof mail.to) =>
              (Array.isArray(v) ? v : v ? [v] : []).flatMap((a) => a.value.map((x) => x.address ?? ''));
            const headers: Record<string, string> = {};
            for (const [k, v] of mail.headers) headers[k] = typeof v === 'string' ? v : JSON.stringify(v);
            messages.push({
              id: String(seq),
              receivedAt: new Date().toISOString(),
              envelope: {
                from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
                to: session.envelope.rcptTo.map((r) => r.address),
              },
              messageId: mail.messageId ?? null,
              from: mail.from?.text ?? '',
              to: addresses(mail.to),
              subject: mail.subject ?? '',
              text: mail.text ?? '',
              html: typeof mail.html === 'string' ? mail.html : '',
              attachments: mail.attachments.map((a) => ({
                filename: a.filename ?? null,
                contentType: a.contentType,
                method:
                  (a.headers.get('content-type') as { params?: Record<string, string> } | undefined)?.params?.method ??
                  null,
                content: a.content.toString('utf8'),
              })),
              headers,
            });
            callback();
          },
          (err: Error) => callback(err),
        );
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(ports.smtp, '127.0.0.1', () => resolve());
  });
  smtp.on('error', () => {
    /* a dropped client connection is not the inbox's problem */
  });

  const app = express();
  app.use(express.json());
  app.get('/api/messages', (_req, res) => {
    res.json({ items: messages });
  });
  app.delete('/api/messages', (_req, res) => {
    messages.length = 0;
    res.status(204).end();
  });
  app.post('/api/fail-next', (req, res) => {
    failNext = Number(req.body?.count ?? 1);
    res.json({ failNext });
  });
  app.get('/', (_req, res) => {
    const rows = [...messages]
      .reverse()
      .map(
        (m) => `<tr><td>${esc(m.receivedAt.slice(0, 19).replace('T', ' '))}</td><td>${esc(m.to.join(', '))}</td>
      <td><a href="/messages/${esc(m.id)}">${esc(m.subject || '(no subject)')}</a></td><td>${m.attachments.map((a) => esc(a.filename ?? a.contentType)).join(', ')}</td></tr>`,
      )
      .join('');
    res.type('html')
      .send(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Local inbox</title><style>body{font-family:system-ui,sans-serif;margin:1.5rem;color:#1d2730}table{border-collapse:collapse;width:100%}
td,th{border-bottom:1px solid #dde3e8;padding:.45rem;text-align:left;font-size:.95rem}a{color:#0b5c7a}</style></head><body>
<h1>Local inbox</h1><p>Every e-mail Waterline sends on this machine lands here; nothing leaves it. ${messages.length} message(s).</p>
<table><thead><tr><th>Received (UTC)</th><th>To</th><th>Subject</th><th>Attached</th></tr></thead><tbody>${rows || '<tr><td colspan="4">Nothing yet.</td></tr>'}</tbody></table></body></html>`);
  });
  app.get('/messages/:id', (req, res) => {
    const m = messages.find((x) => x.id === req.params.id);
    if (!m) {
      res.status(404).type('text').send('No such message');
      return;
    }
    res.type('html')
      .send(`<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(m.subject)}</title><style>body{font-family:system-ui,sans-serif;margin:1rem;color:#1d2730}iframe{width:100%;height:70vh;border:1px solid #c9d2da}
pre{white-space:pre-wrap;background:#f4f6f8;padding:.8rem}</style></head><body><p><a href="/">← Inbox</a></p>
<h1>${esc(m.subject)}</h1><p>From ${esc(m.from)}<br>To ${esc(m.to.join(', '))}<br>Received ${esc(m.receivedAt)}</p>
<iframe sandbox="allow-popups allow-popups-to-escape-sandbox" srcdoc="${esc(m.html)}" title="HTML body"></iframe>
<h2>Plain text</h2><pre>${esc(m.text)}</pre>
${m.attachments.map((a) => `<h2>${esc(a.filename ?? a.contentType)}</h2><pre>${esc(a.content)}</pre>`).join('')}</body></html>`);
  });
  const web = http.createServer(app);
  await new Promise<void>((resolve) => web.listen(ports.web, '127.0.0.1', resolve));
  // Port 0 takes any free port (test runs): report the ones actually bound.
  const smtpPort = (smtp.server.address() as { port: number }).port;
  const webPort = (web.address() as { port: number }).port;
  return {
    smtpUrl: `smtp://127.0.0.1:${smtpPort}`,
    url: `http://127.0.0.1:${webPort}`,
    messages,
    clear: () => {
      messages.length = 0;
    },
    stop: async () => {
      await new Promise<void>((resolve) => web.close(() => resolve()));
      await new Promise<void>((resolve) => smtp.close(() => resolve()));
    },
  };
}
