// The outbox reads back what nodemailer writes; nodemailer's own stream transport produces the input.
import { randomUUID } from 'node:crypto';
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { describe, expect, it } from 'vitest';
import { KIND_HEADER, readOutboxMessage, TENANT_HEADER } from '../../../api/src/services/mail-server';

async function compose(mail: SendMailOptions): Promise<string> {
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' });
  const info = await transport.sendMail({ from: 'Gridwright <no-reply@gridwright.local>', to: 'a@example.test', ...mail });
  return (info.message as Buffer).toString('utf8');
}

describe('reading stored messages', () => {
  it('recovers a non-ASCII subject, the plain text and the HTML of a multipart message, and our headers', async () => {
    const text = `Tenant: Énergie Côte — Nord\n\n${'Long line with umlauts äöü and a link https://gridwright.test/usage?x=1 '.repeat(4)}\n`;
    const html = '<p>Grüße, <a href="https://gridwright.test/usage?x=1&amp;y=2">usage</a></p>';
    const tenantId = randomUUID();
    const raw = await compose({ subject: 'Énergie Côte — 80 % of runs', text, html, headers: { [KIND_HEADER]: 'quota-warning', [TENANT_HEADER]: tenantId } });
    const stored = await readOutboxMessage(raw);
    expect(stored).toMatchObject({ subject: 'Énergie Côte — 80 % of runs', kind: 'quota-warning', tenantId });
    // Quoted-printable soft line breaks undone, line ends as written.
    expect(stored.textBody).toBe(text);
    expect(stored.htmlBody).toBe(html);
    expect(stored.messageId).toMatch(/^<.+@gridwright\.local>$/);
  });

  it('reads a single-part plain message, without our headers', async () => {
    const stored = await readOutboxMessage(await compose({ subject: 'plain', text: 'just text' }));
    expect(stored).toMatchObject({ subject: 'plain', textBody: 'just text\n', htmlBody: null, kind: 'other', tenantId: null });
  });

  it('keeps no tenant for a tenant header that is not an id', async () => {
    const stored = await readOutboxMessage(await compose({ subject: 'x', text: 'x', headers: { [TENANT_HEADER]: "'; DROP TABLE tenants" } }));
    expect(stored.tenantId).toBeNull();
  });
});
