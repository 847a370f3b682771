/**
 * The local mail fake: an in-process SMTP server (smtp-server + mailparser) that captures every
 * mail instead of delivering it. `npm start` uses it when SMTP_URL is not set and writes each
 * mail to <data folder>/mail/ as a .eml file; the specs read captured mail from `messages`.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface CapturedMail {
  to: string;
  subject: string;
  text: string;
  receivedAt: Date;
}

export interface MailFake {
  url: string;
  port: number;
  messages: CapturedMail[];
  /** Resolves with the first captured mail to `to` matching `subject` (waits for it). */
  waitFor(to: string, subject?: RegExp, timeoutMs?: number): Promise<CapturedMail>;
  close(): Promise<void>;
}

export async function startMailFake(opts: { port?: number; folder?: string; onMail?: (m: CapturedMail) => void } = {}): Promise<MailFake> {
  const messages: CapturedMail[] = [];
  const waiters: { to: string; subject?: RegExp; resolve: (m: CapturedMail) => void }[] = [];
  if (opts.folder) mkdirSync(opts.folder, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', async () => {
        const raw = Buffer.concat(chunks);
        const parsed = await simpleParser(raw);
        const to = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(', ') : (parsed.to?.text ?? '');
        const mail: CapturedMail = { to, subject: parsed.subject ?? '', text: parsed.text ?? '', receivedAt: new Date() };
        messages.push(mail);
        if (opts.folder) {
          const stamp = mail.receivedAt.toISOString().replace(/[:.]/g, '-');
          writeFileSync(join(opts.folder, `${stamp}-${to.replace(/[^a-z0-9@.-]/gi, '_')}.eml`), raw);
        }
        opts.onMail?.(mail);
        for (let i = waiters.length - 1; i >= 0; i--) {
          const w = waiters[i];
          if (mail.to.includes(w.to) && (!w.subject || w.subject.test(mail.subject))) {
            waiters.splice(i, 1);
            w.resolve(mail);
          }
        }
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port ?? 0, '127.0.0.1', () => resolve());
  });
  const port = (server.server.address() as AddressInfo).port;
  return {
    url: `smtp://127.0.0.1:${port}`,
    port,
    messages,
    waitFor(to, subject, timeoutMs = 10000) {
      const found = messages.find((m) => m.to.includes(to) && (!subject || subject.test(m.subject)));
      if (found) return Promise.resolve(found);
      return new Promise((resolve, reject) => {
        const w = { to, subject, resolve: (m: CapturedMail) => (clearTimeout(t), resolve(m)) };
        const t = setTimeout(() => {
          waiters.splice(waiters.indexOf(w), 1);
          reject(new Error(`no mail to ${to} within ${timeoutMs} ms`));
        }, timeoutMs);
        waiters.push(w);
      });
    },
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
