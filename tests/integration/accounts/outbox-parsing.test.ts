// The outbox reads back what nodemailer writes; nodemailer's own stream transport produces the input.
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { describe, expect, it } from 'vitest';
import { decodeEncodedWords, parseMimeMessage } from '../../../api/src/lib/parse-mime-message';

async function compose(mail: SendMailOptions): Promise<string> {
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' });
  const info = await transport.sendMail({ from: 'Gridwright <no-reply@gridwright.local>', to: 'a@example.test', ...mail });
  return (info.message as Buffer).toString('utf8');
}

describe('reading stored messages', () => {
  it('recovers a non-ASCII subject, the plain text and the HTML of a multipart message', async () => {
    const text = `Tenant: Énergie Côte — Nord\n\n${'Long line with umlauts äöü and a link https://gridwright.test/usage?x=1 '.repeat(4)}\n`;
    const html = '<p>Grüße, <a href="https://gridwright.test/usage?x=1&amp;y=2">usage</a></p>';
    const raw = await compose({ subject: 'Énergie Côte — 80 % of runs', text, html, headers: { 'x-gridwright-kind': 'quota-warning' } });
    const parsed = parseMimeMessage(raw);
    expect(decodeEncodedWords(parsed.headers.get('subject')!)).toBe('Énergie Côte — 80 % of runs');
    expect(parsed.headers.get('x-gridwright-kind')).toBe('quota-warning');
    expect(parsed.text).toBe(text.replace(/\n/g, '\r\n'));
    expect(parsed.html).toBe(html);
  });

  it('reads a single-part plain message', async () => {
    const parsed = parseMimeMessage(await compose({ subject: 'plain', text: 'just text' }));
    expect(parsed).toMatchObject({ text: 'just text', html: null });
  });
});
