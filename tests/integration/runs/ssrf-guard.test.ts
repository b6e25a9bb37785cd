import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addressRefusal, guardedPost, normaliseAddress } from '../../../api/src/services/ssrf-guard';
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

  // Each spelling and the address it names. IPv4 parts in octal (leading 0) and hex (0x) and fewer
  // than four parts are read as inet_aton(3) reads them (as do URL parsers, WHATWG URL §3.5);
  // IPv4-mapped (::ffff:0:0/96) and IPv4-compatible (::/96, RFC 4291 §2.5.5) IPv6 carry an IPv4
  // address; a zone id (RFC 6874) and a trailing dot (an absolute DNS name) do not change it.
  const SPELLINGS: [string, string][] = [
    ['127.0.0.1', '127.0.0.1'],
    ['127.1', '127.0.0.1'],
    ['2130706433', '127.0.0.1'],
    ['0x7f000001', '127.0.0.1'],
    ['0x7f.0.0.1', '127.0.0.1'],
    ['0x7F.0x00.0x00.0x01', '127.0.0.1'],
    ['0177.0.0.1', '127.0.0.1'],
    ['017700000001', '127.0.0.1'],
    ['127.000.000.001', '127.0.0.1'],
    ['127.0.0.1.', '127.0.0.1'],
    ['::1', '::1'],
    ['[::1]', '::1'],
    ['0:0:0:0:0:0:0:1', '::1'],
    ['::ffff:127.0.0.1', '127.0.0.1'],
    ['::ffff:7f00:1', '127.0.0.1'],
    ['0:0:0:0:0:ffff:127.0.0.1', '127.0.0.1'],
    ['[::ffff:127.0.0.1]', '127.0.0.1'],
    ['::127.0.0.1', '127.0.0.1'],
    ['::7f00:1', '127.0.0.1'],
    ['[::7f00:1]', '127.0.0.1'],
    ['0000:0000:0000:0000:0000:0000:7f00:0001', '127.0.0.1'],
    ['169.254.169.254', '169.254.169.254'],
    ['0xa9fea9fe', '169.254.169.254'],
    ['2852039166', '169.254.169.254'],
    ['::a9fe:a9fe', '169.254.169.254'],
    ['::ffff:a9fe:a9fe', '169.254.169.254'],
    ['012.0.0.1', '10.0.0.1'],
    ['::a00:1', '10.0.0.1'],
    ['::ffff:10.0.0.1', '10.0.0.1'],
    ['192.168.1.1.', '192.168.1.1'],
    ['::c0a8:101', '192.168.1.1'],
    ['fe80::1%eth0', 'fe80::1'],
    ['fe80::1%25eth0', 'fe80::1'],
    ['[fe80::1%25eth0]', 'fe80::1'],
    ['0', '0.0.0.0'],
    ['::', '::'],
    ['64:ff9b::7f00:1', '64:ff9b::7f00:1'],
    ['2002:7f00:1::', '2002:7f00:1::'],
  ];

  it(`reads ${SPELLINGS.length} spellings of internal addresses as the address they name, and refuses each`, () => {
    const strict = { allowLoopback: false };
    const misread = SPELLINGS.filter(([spelling, address]) => normaliseAddress(spelling)?.toString() !== address);
    expect(misread).toEqual([]);
    const passed = SPELLINGS.filter(([spelling]) => addressRefusal(spelling, strict) === null);
    expect(passed).toEqual([]);
    expect(SPELLINGS.length).toBeGreaterThanOrEqual(30);
  });

  it('still lets public addresses through in any of those forms', () => {
    const strict = { allowLoopback: false };
    for (const a of ['93.184.216.34', '0x5db8d822', '1572395042', '93.184.216.34.', '::ffff:93.184.216.34', '2606:4700:4700::1111', '[2606:4700:4700::1111]']) {
      expect(addressRefusal(a, strict), a).toBeNull();
    }
    expect(normaliseAddress('example.org')).toBeNull();
    expect(normaliseAddress('127.0.0.1.nip.io')).toBeNull();
  });

  it('allows the loopback spellings, and only those, when loopback is allowed (development)', () => {
    const dev = { allowLoopback: true };
    for (const a of ['::7f00:1', '::127.0.0.1', '2130706433', '[::1]']) expect(addressRefusal(a, dev), a).toBeNull();
    for (const a of ['::a9fe:a9fe', '::a00:1', '012.0.0.1']) expect(addressRefusal(a, dev), a).not.toBeNull();
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
