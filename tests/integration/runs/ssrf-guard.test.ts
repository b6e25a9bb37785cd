import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addressRefusal, guardedPost } from '../../../api/src/services/ssrf-guard';
import { startWebhookReceiver, type WebhookReceiver } from '../../support/webhook-receiver';

// Address ranges: IANA special-purpose registries (RFC 6890 and successors), as ipaddr.js names them.
describe('the SSRF guard', () => {
  it('lets only public unicast addresses through (and loopback when allowed)', () => {
    const strict = { allowLoopback: false };
    for (const a of ['93.184.216.34', '2606:4700:4700::1111']) expect(addressRefusal(a, strict)).toBeNull();
    for (const a of ['127.0.0.1', '::1', '10.0.0.1', '172.31.255.255', '192.168.0.1', '169.254.169.254', '100.64.0.1', '0.0.0.0', 'fe80::1', 'fc00::1', '::ffff:192.168.0.1', '255.255.255.255', 'ff02::1']) {
      expect(addressRefusal(a, strict), a).not.toBeNull();
    }
    expect(addressRefusal('127.0.0.1', { allowLoopback: true })).toBeNull();
    expect(addressRefusal('::ffff:127.0.0.1', { allowLoopback: true })).toBeNull();
    expect(addressRefusal('10.0.0.1', { allowLoopback: true })).not.toBeNull();
  });

  describe('limits what a receiver can send back', () => {
    let receiver: WebhookReceiver;
    beforeAll(async () => {
      receiver = await startWebhookReceiver();
    });
    afterAll(async () => receiver.close());
    const opts = { allowLoopback: true, headers: {}, timeoutMs: 500, maxResponseBytes: 1024 };

    it('stops reading a large answer at the size limit', async () => {
      receiver.script({ status: 200, body: 'x'.repeat(5 * 1024 * 1024) });
      const res = await guardedPost(receiver.url, '{}', opts);
      expect(res).toMatchObject({ statusCode: 200, truncated: true, bytesRead: 1024 });
    });

    it('gives up on a slow answer at the time limit', async () => {
      receiver.script({ status: 200, delayMs: 2_000 });
      await expect(guardedPost(receiver.url, '{}', opts)).rejects.toThrow(/within 500 ms/);
    });

    it('refuses to connect where the policy forbids', async () => {
      await expect(guardedPost(receiver.url, '{}', { ...opts, allowLoopback: false })).rejects.toThrow(/https/);
    });
  });
});
