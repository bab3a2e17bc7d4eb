import { simpleParser, type AddressObject } from 'mailparser';
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { SMTPServer } from 'smtp-server';
import { StartError, assertPortFree } from './util';

/*
 * A mail catcher for the demo and the tests. Every message the app sends is accepted (no
 * authentication, no TLS, loopback only), parsed, and written to a folder as JSON plus the raw .eml,
 * so tests can read mail as files and people can read it in a small viewer. Nothing is relayed.
 */

export interface CapturedMailAttachment {
  filename: string | null;
  contentType: string;
  size: number;
}

/** One message as written to `<dir>/<id>.json`; the raw message sits beside it as `<id>.eml`. */
export interface CapturedMail {
  id: string;
  receivedAt: string;
  envelopeFrom: string | null;
  envelopeTo: string[];
  /** The From header as written, e.g. `Plumbline <quality@brackwater.example>`. */
  from: string;
  /** Addresses from the To and Cc headers, lower-cased. */
  to: string[];
  cc: string[];
  subject: string;
  text: string;
  html: string | null;
  messageId: string | null;
  date: string | null;
  attachments: CapturedMailAttachment[];
  emlFile: string;
}

export interface SmtpFakeOptions {
  port: number;
  /** Read-only web viewer; omitted means no viewer. */
  viewerPort?: number;
  dir: string;
  log?: (line: string) => void;
}

export interface RunningSmtpFake {
  port: number;
  viewerUrl: string | null;
  dir: string;
  stop(): Promise<void>;
}

const idPattern = /^[0-9]{8}T[0-9]{9}Z-[0-9]{4,}$/;

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  const list = value === undefined ? [] : Array.isArray(value) ? value : [value];
  return list.flatMap((group) => group.value.map((a) => (a.address ?? '').toLowerCase()).filter(Boolean));
}

/** Sortable and readable: 20261202T020512345Z (UTC, milliseconds). */
function compactTimestamp(d: Date): string {
  return d.toISOString().replace(/[-:.]/g, '');
}

export async function startSmtpFake(opts: SmtpFakeOptions): Promise<RunningSmtpFake> {
  const log = opts.log ?? (() => {});
  const dir = path.resolve(opts.dir);
  mkdirSync(dir, { recursive: true });
  await assertPortFree(opts.port, 'the SMTP fake', 'PLUMBLINE_SMTP_PORT');
  if (opts.viewerPort !== undefined) {
    await assertPortFree(opts.viewerPort, 'the mail viewer', 'PLUMBLINE_MAIL_VIEWER_PORT');
  }

  let counter = 0;
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    hideSTARTTLS: true,
    logger: false,
    banner: 'Plumbline SMTP fake (messages are stored, never delivered)',
    size: 30 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        const receivedAt = new Date();
        counter += 1;
        const id = `${compactTimestamp(receivedAt)}-${String(counter).padStart(4, '0')}`;
        simpleParser(raw)
          .then((parsed) => {
            const mail: CapturedMail = {
              id,
              receivedAt: receivedAt.toISOString(),
              envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
              envelopeTo: session.envelope.rcptTo.map((r) => r.address.toLowerCase()),
              from: parsed.from?.text ?? '',
              to: addresses(parsed.to),
              cc: addresses(parsed.cc),
              subject: parsed.subject ?? '',
              text: parsed.text ?? '',
              html: parsed.html || null,
              messageId: parsed.messageId ?? null,
              date: parsed.date ? parsed.date.toISOString() : null,
              attachments: parsed.attachments.map((a) => ({
                filename: a.filename ?? null,
                contentType: a.contentType,
                size: a.size,
              })),
              emlFile: `${id}.eml`,
            };
            // The .eml goes first so a reader that sees the JSON can always open the raw message.
            writeFileSync(path.join(dir, `${id}.eml`), raw);
            writeFileSync(path.join(dir, `${id}.json`), JSON.stringify(mail, null, 2));
            log(`mail to ${mail.to.join(', ') || mail.envelopeTo.join(', ')}: ${mail.subject}`);
            callback();
          })
          .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))));
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    smtp.once('error', (err) => reject(new StartError(`the SMTP fake could not listen on port ${opts.port}: ${err.message}`)));
    smtp.listen(opts.port, '127.0.0.1', () => resolve());
  });
  // After start-up, a broken client connection must not bring the whole stack down.
  smtp.on('error', (err) => log(`SMTP fake: ${err.message}`));

  let viewer: ReturnType<typeof createServer> | null = null;
  let viewerUrl: string | null = null;
  if (opts.viewerPort !== undefined) {
    viewer = createServer((req, res) => serveViewer(dir, req, res));
    const viewerPort = opts.viewerPort;
    await new Promise<void>((resolve, reject) => {
      viewer!.once('error', (err) =>
        reject(new StartError(`the mail viewer could not listen on port ${viewerPort}: ${err.message}`)),
      );
      viewer!.listen(viewerPort, '127.0.0.1', () => resolve());
    }).catch(async (err: unknown) => {
      await new Promise<void>((r) => smtp.close(() => r()));
      throw err;
    });
    viewerUrl = `http://localhost:${viewerPort}/`;
  }

  let stopped = false;
  return {
    port: opts.port,
    viewerUrl,
    dir,
    async stop() {
      if (stopped) return;
      stopped = true;
      await new Promise<void>((r) => smtp.close(() => r()));
      if (viewer) {
        viewer.closeAllConnections();
        await new Promise<void>((r) => viewer!.close(() => r()));
      }
    },
  };
}

/** Messages in `dir`, oldest first. */
export function listCapturedMail(dir: string): CapturedMail[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  return names
    .filter((n) => n.endsWith('.json') && idPattern.test(n.slice(0, -5)))
    .sort()
    .map((n) => JSON.parse(readFileSync(path.join(dir, n), 'utf8')) as CapturedMail);
}

// ---------------------------------------------------------------------------------------------
// Viewer: plain HTML from node:http. Message HTML is shown only inside a sandboxed iframe with no
// permissions at all, and the viewer's own CSP forbids scripts and remote loads.

const esc = (s: string) =>
  s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');

const page = (title: string, body: string) => `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(title)}</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>
  body { font: 15px/1.45 system-ui, sans-serif; margin: 0; color: #1d2430; background: #f6f7f9; }
  header { background: #24364a; color: #fff; padding: 10px 20px; }
  header a { color: #fff; text-decoration: none; font-weight: 600; }
  main { max-width: 980px; margin: 0 auto; padding: 16px 20px 40px; }
  table { width: 100%; border-collapse: collapse; background: #fff; }
  th, td { text-align: left; padding: 6px 10px; border-bottom: 1px solid #dde1e7; vertical-align: top; }
  th { font-weight: 600; width: 9em; }
  pre { white-space: pre-wrap; background: #fff; border: 1px solid #dde1e7; padding: 12px; }
  iframe { width: 100%; height: 520px; border: 1px solid #dde1e7; background: #fff; }
  .muted { color: #5b6675; }
</style></head>
<body><header><a href="/">Outgoing mail (local fake, nothing is delivered)</a></header><main>${body}</main></body></html>`;

function send(res: ServerResponse, status: number, type: string, body: string | Buffer) {
  res.writeHead(status, {
    'content-type': type,
    'cache-control': 'no-store',
    'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; img-src data:; frame-src 'self'",
    'x-content-type-options': 'nosniff',
  });
  res.end(body);
}

function serveViewer(dir: string, req: IncomingMessage, res: ServerResponse) {
  if (req.method !== 'GET' && req.method !== 'HEAD') return send(res, 405, 'text/plain', 'read-only viewer');
  const url = new URL(req.url ?? '/', 'http://viewer.invalid');

  if (url.pathname === '/') {
    const mails = listCapturedMail(dir).reverse();
    const rows = mails
      .map(
        (m) =>
          `<tr><td class="muted">${esc(m.receivedAt.replace('T', ' ').slice(0, 19))}</td>` +
          `<td>${esc(m.to.join(', ') || m.envelopeTo.join(', '))}</td>` +
          `<td><a href="/m/${esc(m.id)}">${esc(m.subject || '(no subject)')}</a></td></tr>`,
      )
      .join('\n');
    const body =
      `<h1>Messages (${mails.length})</h1><p class="muted">Newest first. Folder: ${esc(dir)}. Reload to see new mail.</p>` +
      (mails.length
        ? `<table><thead><tr><th>Received (UTC)</th><th>To</th><th>Subject</th></tr></thead><tbody>${rows}</tbody></table>`
        : '<p>No mail yet.</p>');
    return send(res, 200, 'text/html; charset=utf-8', page('Outgoing mail', body));
  }

  const match = /^\/m\/([^/]+?)(\.eml)?$/.exec(url.pathname);
  const id = match?.[1];
  if (!id || !idPattern.test(id)) return send(res, 404, 'text/plain', 'not found');
  let mail: CapturedMail;
  try {
    mail = JSON.parse(readFileSync(path.join(dir, `${id}.json`), 'utf8')) as CapturedMail;
  } catch {
    return send(res, 404, 'text/plain', 'not found');
  }
  if (match?.[2]) {
    return send(res, 200, 'text/plain; charset=utf-8', readFileSync(path.join(dir, mail.emlFile)));
  }

  const header = (name: string, value: string | null) =>
    value ? `<tr><th>${esc(name)}</th><td>${esc(value)}</td></tr>` : '';
  const body =
    `<h1>${esc(mail.subject || '(no subject)')}</h1><table>` +
    header('From', mail.from) +
    header('To', mail.to.join(', ')) +
    header('Cc', mail.cc.join(', ')) +
    header('Envelope', `${mail.envelopeFrom ?? '<>'} → ${mail.envelopeTo.join(', ')}`) +
    header('Date', mail.date) +
    header('Received', mail.receivedAt) +
    header('Message-ID', mail.messageId) +
    header(
      'Attachments',
      mail.attachments.map((a) => `${a.filename ?? '(unnamed)'} (${a.contentType}, ${a.size} bytes)`).join('; ') || null,
    ) +
    `</table><p><a href="/m/${esc(mail.id)}.eml">Raw message (.eml)</a></p>` +
    `<h2>Plain text</h2><pre>${esc(mail.text || '(no plain-text part)')}</pre>` +
    `<h2>HTML</h2>` +
    (mail.html
      ? `<iframe sandbox="" title="HTML part" srcdoc="${esc(mail.html)}"></iframe>`
      : '<p class="muted">(no HTML part)</p>');
  return send(res, 200, 'text/html; charset=utf-8', page(mail.subject || 'Message', body));
}
