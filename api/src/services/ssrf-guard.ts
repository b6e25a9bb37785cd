import dns from 'node:dns';
import http from 'node:http';
import https from 'node:https';
import type { LookupFunction } from 'node:net';
import ipaddr from 'ipaddr.js';

/**
 * Server-side request forgery guard for webhook URLs: https only, and every address the host
 * resolves to must be a public unicast address. `allowLoopback` (a development setting) also lets
 * through loopback addresses, over http too. The check runs again at connect time, on the very
 * addresses the socket then uses, so a DNS answer that changes after the first check (rebinding)
 * is refused too. Redirects are never followed.
 */
export interface AddressPolicy {
  allowLoopback: boolean;
}

export class UnsafeUrlError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UnsafeUrlError';
  }
}

/**
 * The one form of an IP literal the checks below judge, or null when `text` is no IP literal:
 * brackets, a zone id (`%eth0`, `%25eth0`) and a trailing dot dropped; IPv4 in any of the
 * spellings inet_aton reads (decimal, octal, hex, fewer than four parts); and an IPv4 address
 * carried in IPv6 — mapped (`::ffff:127.0.0.1`) or compatible (`::127.0.0.1`, `::7f00:1`, RFC 4291
 * §2.5.5.1) — taken out, so it meets the IPv4 rules. (`::` and `::1` keep their IPv6 meaning.)
 */
export function normaliseAddress(text: string): ipaddr.IPv4 | ipaddr.IPv6 | null {
  const bare = stripBrackets(text.trim())
    .replace(/%.*$/, '')
    .replace(/\.$/, '');
  if (!ipaddr.isValid(bare)) return null;
  const ip = ipaddr.parse(bare);
  if (ip.kind() === 'ipv4') return ip;
  const v6 = ip as ipaddr.IPv6;
  if (v6.isIPv4MappedAddress()) return v6.toIPv4Address();
  const [a, b, c, d, e, f, high, low] = v6.parts;
  const compatible = a === 0 && b === 0 && c === 0 && d === 0 && e === 0 && f === 0 && (high !== 0 || low > 1);
  return compatible ? ipaddr.fromByteArray([high >> 8, high & 0xff, low >> 8, low & 0xff]) : v6;
}

/** Why an address may not be called, or null when it may. */
export function addressRefusal(address: string, policy: AddressPolicy): string | null {
  const ip = normaliseAddress(address);
  if (!ip) return `${address} is not an IP address`;
  const range = ip.range();
  if (range === 'unicast') return null;
  if (range === 'loopback' && policy.allowLoopback) return null;
  return `${address} is a ${range} address${ip.toString() === address ? '' : ` (${ip.toString()})`}; webhooks may only call public addresses`;
}

function stripBrackets(host: string) {
  return host.startsWith('[') && host.endsWith(']') ? host.slice(1, -1) : host;
}

/** Checks the URL's form (scheme, no credentials); the addresses are checked by `resolvePublicAddresses`. */
export function checkUrlForm(raw: string, policy: AddressPolicy): URL {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    throw new UnsafeUrlError('is not an absolute URL');
  }
  if (url.protocol !== 'https:' && !(url.protocol === 'http:' && policy.allowLoopback)) {
    throw new UnsafeUrlError('must use https');
  }
  if (url.username || url.password) throw new UnsafeUrlError('must not carry credentials');
  return url;
}

/** Every address `host` resolves to, each checked; one refused address refuses the host. */
export async function resolvePublicAddresses(host: string, policy: AddressPolicy): Promise<{ address: string; family: number }[]> {
  const bare = stripBrackets(host);
  const literal = normaliseAddress(bare);
  const addresses = literal
    ? [{ address: literal.toString(), family: literal.kind() === 'ipv6' ? 6 : 4 }]
    : await dns.promises.lookup(bare, { all: true, verbatim: true }).catch((err: NodeJS.ErrnoException) => {
        throw new UnsafeUrlError(`host ${bare} does not resolve (${err.code ?? err.message})`);
      });
  if (!addresses.length) throw new UnsafeUrlError(`host ${bare} does not resolve`);
  for (const a of addresses) {
    const refusal = addressRefusal(a.address, policy);
    if (refusal) throw new UnsafeUrlError(literal ? refusal : `host ${bare} resolves to ${refusal}`);
  }
  return addresses;
}

/** Validates a URL for storing: form and resolution, with the message naming the problem. */
export async function assertSafeWebhookUrl(raw: string, policy: AddressPolicy): Promise<URL> {
  const url = checkUrlForm(raw, policy);
  const addresses = await resolvePublicAddresses(url.hostname, policy);
  if (url.protocol === 'http:' && addresses.some((a) => addressRefusal(a.address, { allowLoopback: false }) === null)) {
    throw new UnsafeUrlError('must use https (plain http is allowed for loopback receivers only)');
  }
  return url;
}

export interface GuardedResponse {
  statusCode: number;
  /** How many body bytes were read (at most `maxResponseBytes`); the body itself is never interpreted. */
  bytesRead: number;
  truncated: boolean;
}

export interface GuardedPostOptions extends AddressPolicy {
  headers: Record<string, string>;
  timeoutMs: number;
  maxResponseBytes: number;
}

/**
 * POSTs `body` to a checked URL. The connection is made only to addresses that pass the policy
 * at connect time; the response is read up to a size limit and within a deadline, then dropped.
 */
export async function guardedPost(raw: string, body: string, opts: GuardedPostOptions): Promise<GuardedResponse> {
  const policy = { allowLoopback: opts.allowLoopback };
  const url = await assertSafeWebhookUrl(raw, policy);
  const lookup: LookupFunction = (hostname, options, callback) => {
    resolvePublicAddresses(hostname, policy).then(
      (addresses) => {
        if ((options as dns.LookupOptions).all) (callback as any)(null, addresses);
        else callback(null, addresses[0].address, addresses[0].family);
      },
      (err) => callback(err, '', 0),
    );
  };
  const transport = url.protocol === 'https:' ? https : http;
  return new Promise<GuardedResponse>((resolve, reject) => {
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(deadline);
      fn();
    };
    const req = transport.request(
      url,
      {
        method: 'POST',
        headers: { ...opts.headers, 'content-length': String(Buffer.byteLength(body)) },
        lookup,
        agent: false,
      },
      (res) => {
        let bytesRead = 0;
        let truncated = false;
        res.on('data', (chunk: Buffer) => {
          bytesRead += chunk.length;
          if (bytesRead > opts.maxResponseBytes) {
            truncated = true;
            bytesRead = opts.maxResponseBytes;
            res.destroy();
            finish(() => resolve({ statusCode: res.statusCode ?? 0, bytesRead, truncated }));
          }
        });
        res.on('end', () => finish(() => resolve({ statusCode: res.statusCode ?? 0, bytesRead, truncated })));
        res.on('error', (err) => finish(() => reject(err)));
      },
    );
    const deadline = setTimeout(() => {
      req.destroy(new Error(`no complete answer within ${opts.timeoutMs} ms`));
    }, opts.timeoutMs);
    req.on('error', (err) => finish(() => reject(err)));
    req.end(body);
  });
}
