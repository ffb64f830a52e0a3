/**
 * The local mail catcher: a real SMTP server on loopback that keeps every message it
 * receives (raw .eml plus a parsed summary) under the data folder, and a small read-only
 * HTTP API over them. `npm start` and `npm test` run it, so the app's own nodemailer
 * transport speaks real SMTP in development and tests.
 *
 * HTTP: GET /messages · GET /messages/:id · GET /messages/:id/raw ·
 *       GET /messages/:id/attachments/:index · DELETE /messages · GET /health
 */
import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import http from 'node:http';
import path from 'node:path';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface CaughtAttachment {
  index: number;
  filename: string | null;
  contentType: string;
  size: number;
  sha256: string;
}

export interface CaughtMessageSummary {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  attachments: CaughtAttachment[];
  /** The app's outbox row this message was sent from (its X-Latchwell-Outbox-Id header), if any. */
  outboxId: string | null;
}

export interface CaughtMessage extends CaughtMessageSummary {
  text: string;
  html: string | null;
  envelope: { from: string | null; to: string[] };
}

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '')).filter(Boolean);
}

function headerText(value: unknown): string | null {
  return typeof value === 'string' && value.trim() ? value.trim() : null;
}

function summarise(id: string, receivedAt: string, parsed: ParsedMail): CaughtMessageSummary {
  return {
    id,
    receivedAt,
    from: addresses(parsed.from)[0] ?? '',
    to: addresses(parsed.to),
    subject: parsed.subject ?? '',
    outboxId: headerText(parsed.headers.get('x-latchwell-outbox-id')),
    attachments: parsed.attachments.map((a, index) => ({
      index,
      filename: a.filename ?? null,
      contentType: a.contentType,
      size: a.size,
      sha256: createHash('sha256').update(a.content).digest('hex'),
    })),
  };
}

export interface CatcherOptions {
  dir: string;
  host?: string;
  smtpPort: number;
  httpPort: number;
}

export interface RunningCatcher {
  close(): Promise<void>;
}

const idPattern = /^[0-9a-z-]{10,80}$/;

/** Starts both servers; resolves once they listen. */
export async function startMailCatcher(options: CatcherOptions): Promise<RunningCatcher> {
  const host = options.host ?? '127.0.0.1';
  await fs.mkdir(options.dir, { recursive: true });

  const rawPath = (id: string) => path.join(options.dir, `${id}.eml`);
  const metaPath = (id: string) => path.join(options.dir, `${id}.json`);

  async function readParsed(
    id: string,
  ): Promise<{
    raw: Buffer;
    parsed: ParsedMail;
    meta: CaughtMessageSummary & { envelope: CaughtMessage['envelope'] };
  }> {
    const raw = await fs.readFile(rawPath(id));
    const meta = JSON.parse(await fs.readFile(metaPath(id), 'utf8'));
    return { raw, parsed: await simpleParser(raw), meta };
  }

  async function list(): Promise<CaughtMessageSummary[]> {
    const names = (await fs.readdir(options.dir)).filter((n) => n.endsWith('.json'));
    const items = await Promise.all(
      names.map(
        async (n) => JSON.parse(await fs.readFile(path.join(options.dir, n), 'utf8')) as CaughtMessage,
      ),
    );
    return items
      .map(({ id, receivedAt, from, to, subject, attachments, outboxId }) => ({
        id,
        receivedAt,
        from,
        to,
        subject,
        attachments,
        outboxId: outboxId ?? null,
      }))
      .sort((a, b) => b.receivedAt.localeCompare(a.receivedAt) || b.id.localeCompare(a.id));
  }

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    size: 30 * 1024 * 1024,
    onAuth(_auth, _session, callback) {
      callback(null, { user: 'catcher' });
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', callback);
      stream.on('end', async () => {
        try {
          const raw = Buffer.concat(chunks);
          const receivedAt = new Date().toISOString();
          const id = `${receivedAt.replace(/[-:.TZ]/g, '')}-${randomUUID()}`;
          const parsed = await simpleParser(raw);
          const envelope = {
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
            to: session.envelope.rcptTo.map((r) => r.address),
          };
          await fs.writeFile(rawPath(id), raw);
          await fs.writeFile(
            metaPath(id),
            JSON.stringify({ ...summarise(id, receivedAt, parsed), envelope }),
          );
          callback();
        } catch (error) {
          callback(error as Error);
        }
      });
    },
  });

  const api = http.createServer(async (req, res) => {
    const send = (status: number, body: unknown, type = 'application/json') => {
      res.writeHead(status, { 'content-type': type });
      res.end(type === 'application/json' ? JSON.stringify(body) : (body as Buffer));
    };
    try {
      const url = new URL(req.url ?? '/', 'http://catcher');
      const parts = url.pathname.split('/').filter(Boolean);
      if (req.method === 'GET' && url.pathname === '/health') return send(200, { ok: true });
      if (parts[0] !== 'messages') return send(404, { error: 'not found' });
      if (req.method === 'DELETE' && parts.length === 1) {
        for (const n of await fs.readdir(options.dir))
          await fs.rm(path.join(options.dir, n), { force: true });
        return send(200, { ok: true });
      }
      if (req.method !== 'GET') return send(405, { error: 'method not allowed' });
      if (parts.length === 1) return send(200, await list());
      const id = parts[1];
      if (!idPattern.test(id)) return send(404, { error: 'not found' });
      const found = await readParsed(id).catch(() => null);
      if (!found) return send(404, { error: 'not found' });
      if (parts.length === 2) {
        const message: CaughtMessage = {
          ...found.meta,
          text: found.parsed.text ?? '',
          html: typeof found.parsed.html === 'string' ? found.parsed.html : null,
        };
        return send(200, message);
      }
      if (parts[2] === 'raw') return send(200, found.raw, 'message/rfc822');
      if (parts[2] === 'attachments' && parts[3] !== undefined) {
        const attachment = found.parsed.attachments[Number(parts[3])];
        if (!attachment) return send(404, { error: 'not found' });
        return send(200, attachment.content, attachment.contentType || 'application/octet-stream');
      }
      return send(404, { error: 'not found' });
    } catch (error) {
      send(500, { error: error instanceof Error ? error.message : 'error' });
    }
  });

  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(options.smtpPort, host, () => resolve());
  });
  await new Promise<void>((resolve, reject) => {
    api.once('error', reject);
    api.listen(options.httpPort, host, () => resolve());
  });

  return {
    close: () =>
      Promise.all([
        new Promise<void>((r) => smtp.close(() => r())),
        new Promise<void>((r) => {
          api.closeAllConnections();
          api.close(() => r());
        }),
      ]).then(() => undefined),
  };
}
