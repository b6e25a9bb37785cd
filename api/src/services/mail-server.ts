// The loopback SMTP server `npm start` and the tests run when SMTP_URL is unset: every message it
// accepts lands in the outbox table, where operators read it.
import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { DataSource } from 'typeorm';
import { OutboxMessage } from '../db/entities/outbox-message';
import type { Logger } from '../lib/logger';
import { isUuid } from '../lib/uuid';

export const KIND_HEADER = 'x-gridwright-kind';
export const TENANT_HEADER = 'x-gridwright-tenant';

export interface LocalSmtpServer {
  port: number;
  close(): Promise<void>;
}

/** What the outbox keeps of a message besides its envelope: the decoded subject and bodies, and Gridwright's own headers. */
export async function readOutboxMessage(raw: string) {
  const parsed = await simpleParser(raw, { skipHtmlToText: true, skipTextToHtml: true, skipTextLinks: true, skipImageLinks: true });
  const header = (name: string) => {
    const value = parsed.headers.get(name);
    return typeof value === 'string' ? value : undefined;
  };
  const tenant = header(TENANT_HEADER) ?? '';
  return {
    tenantId: isUuid(tenant) ? tenant : null,
    kind: header(KIND_HEADER) ?? 'other',
    subject: parsed.subject ?? '',
    textBody: parsed.text || null,
    htmlBody: parsed.html || null,
    messageId: parsed.messageId ?? null,
  };
}

export async function storeReceivedMessage(db: DataSource, envelope: { from: string; to: string[] }, raw: string): Promise<void> {
  await db.getRepository(OutboxMessage).insert({
    receivedAt: new Date(),
    mailFrom: envelope.from,
    rcptTo: envelope.to,
    ...(await readOutboxMessage(raw)),
    raw,
  });
}

export function startLocalSmtpServer(db: DataSource, log: Logger, port = 0): Promise<LocalSmtpServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: 5 * 1024 * 1024,
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        const envelope = {
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((r) => r.address),
        };
        storeReceivedMessage(db, envelope, Buffer.concat(chunks).toString('utf8')).then(
          () => callback(),
          (err: Error) => {
            log.error({ err }, 'outbox: could not store a message');
            callback(Object.assign(new Error('Temporary failure storing the message'), { responseCode: 451 }));
          },
        );
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      server.on('error', (err) => log.error({ err }, 'local SMTP server error'));
      resolve({
        port: (server.server.address() as AddressInfo).port,
        close: () => new Promise<void>((r) => server.close(() => r())),
      });
    });
  });
}
