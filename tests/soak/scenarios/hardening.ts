// Figures for the hardening the README reports, measured on real processes over loopback:
// - how long a refused sign-in takes for a real account and for an unknown address (bcrypt cost 12);
// - /healthz while ten 7.8 MB bodies are sent at once, unauthenticated (refused from their headers)
//   and authenticated (read, parsed and validated);
// - how soon `npm start` serves again after its app process is SIGKILLed, and that Ctrl-C ends it
//   with PostgreSQL (here the cluster of the soak run, which npm start leaves alone when DATABASE_URL is set).
import { execFileSync, spawn } from 'node:child_process';
import net from 'node:net';
import { freePort } from '../../../scripts/lib/postgres.mjs';
import type { AppContext } from '../../../api/src/context';
import { createMember } from '../../../api/src/services/members';
import { repoRoot } from '../lib/child-process';
import { childEnv, startApi, type SoakTenant } from '../lib/harness';
import type { ResultRow } from '../lib/results';

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const quantile = (xs: number[], q: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(q * xs.length))]!;

async function timedSignIn(base: string, email: string, from: string): Promise<number> {
  const t0 = performance.now();
  const res = await fetch(`${base}/v1/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-forwarded-for': from },
    body: JSON.stringify({ email, password: 'not-the-password-1' }),
  });
  await res.arrayBuffer();
  if (res.status !== 401) throw new Error(`sign-in answered ${res.status}`);
  return performance.now() - t0;
}

/** Sends `bytes` of JSON body to `path`, returning once the response head arrives (or the server closes). */
function largeBody(port: number, path: string, bytes: number, headers: Record<string, string>): Promise<string> {
  return new Promise((resolve) => {
    const socket = net.connect(port, '127.0.0.1');
    let head = '';
    const finish = () => resolve(head.split('\r\n')[0] || 'closed before an answer');
    socket.on('data', (c) => {
      head += c.toString('latin1');
      if (head.includes('\r\n\r\n')) {
        socket.destroy();
        finish();
      }
    });
    socket.on('error', finish);
    socket.on('close', finish);
    const prefix = '{"horizon":{"start":"2027-03-01T00:00:00Z","stepMinutes":60,"steps":24},"pad":"';
    const suffix = '"}';
    socket.write(
      [`POST ${path} HTTP/1.1`, 'Host: 127.0.0.1', 'Content-Type: application/json', `Content-Length: ${bytes}`, ...Object.entries(headers).map(([k, v]) => `${k}: ${v}`), '', ''].join('\r\n'),
    );
    socket.write(prefix);
    const chunk = Buffer.alloc(64 * 1024, 'x');
    let left = bytes - prefix.length - suffix.length;
    const pump = () => {
      while (left > 0 && !socket.destroyed) {
        const n = Math.min(left, chunk.length);
        left -= n;
        if (!socket.write(chunk.subarray(0, n))) return socket.once('drain', pump);
      }
      if (!socket.destroyed) socket.write(suffix);
    };
    pump();
  });
}

async function healthzDuring(base: string, load: Promise<unknown>): Promise<number[]> {
  const samples: number[] = [];
  let done = false;
  void load.finally(() => (done = true));
  while (!done) {
    const t0 = performance.now();
    await (await fetch(`${base}/healthz`)).arrayBuffer();
    samples.push(performance.now() - t0);
  }
  return samples;
}

async function waitHealthy(base: string, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const ok = await fetch(`${base}/healthz`).then((r) => r.ok, () => false);
    if (ok) return;
    if (Date.now() > deadline) throw new Error(`${base}/healthz not healthy within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export async function hardeningScenario(opts: { ctx: AppContext; databaseUrl: string; tenant: SoakTenant }): Promise<ResultRow[]> {
  const rows: ResultRow[] = [];
  const row = (scenario: string, measure: string, value: string, pass: boolean | null = null) => rows.push({ scenario, measure, value, pass });

  // Many failures from many addresses: the lock must not end the measurement.
  const api = await startApi(opts.databaseUrl, { TRUST_PROXY: 'true', SIGNIN_MAX_FAILURES: '100000' });
  try {
    const email = `soak-timing-${Date.now()}@example.test`;
    await opts.ctx.db.transaction((m) => createMember(opts.ctx, m, { tenantId: opts.tenant.tenantId, email, role: 'viewer', password: 'the-real-password-1' }));
    const real: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 40; i++) {
      real.push(await timedSignIn(api.base, email, `198.51.100.${(i % 200) + 1}`));
      unknown.push(await timedSignIn(api.base, `nobody-${i}-${Date.now()}@example.test`, `203.0.113.${(i % 200) + 1}`));
    }
    const scenario = 'Sign-in refusal, bcrypt cost 12, 40 each, alternating';
    row(scenario, 'wrong password for a real account (median)', `${median(real).toFixed(0)} ms`);
    row(scenario, 'unknown address (median)', `${median(unknown).toFixed(0)} ms`);
    const ratio = median(real) / median(unknown);
    row(scenario, 'ratio real / unknown', ratio.toFixed(2), ratio > 0.8 && ratio < 1.25);

    const port = Number(new URL(api.base).port);
    // Batches of ten bodies sent at once, one batch after another, for FLOOD_SECONDS.
    const FLOOD_SECONDS = 10;
    const flood = async (label: string, headers: Record<string, string>) => {
      const answers: string[] = [];
      const until = Date.now() + FLOOD_SECONDS * 1000;
      const sent = (async () => {
        while (Date.now() < until) await Promise.all(Array.from({ length: 10 }, () => largeBody(port, '/v1/runs', 7_800_000, headers).then((a) => answers.push(a))));
      })();
      const samples = await healthzDuring(api.base, sent);
      const counts = new Map<string, number>();
      for (const a of answers) counts.set(a.replace(/^HTTP\/1\.1 (\d+).*/, '$1'), (counts.get(a.replace(/^HTTP\/1\.1 (\d+).*/, '$1')) ?? 0) + 1);
      const statuses = [...counts].map(([status, n]) => `${n} × ${status}`).join(', ');
      row(
        `/healthz during ${FLOOD_SECONDS} s of 7.8 MB bodies, ten at a time`,
        label,
        `${answers.length} bodies (${statuses}); ${samples.length} probes, p50 ${median(samples).toFixed(0)} ms, p99 ${quantile(samples, 0.99).toFixed(0)} ms, max ${Math.max(...samples).toFixed(0)} ms`,
      );
    };
    await flood('unauthenticated (refused from the headers)', {});
    await flood('authenticated (read, parsed, validated)', { Authorization: `Bearer ${opts.tenant.key}` });
  } finally {
    await api.child.kill();
  }

  // npm start, on the soak cluster: kill its app process and time the way back.
  const appPort = await freePort();
  const base = `http://127.0.0.1:${appPort}`;
  const start = spawn(process.execPath, ['scripts/start.mjs'], {
    cwd: repoRoot,
    env: { ...process.env, ...childEnv(opts.databaseUrl, { PORT: String(appPort), HOST: '127.0.0.1' }) },
    stdio: 'ignore',
  });
  const startExited = new Promise<number | null>((resolve) => start.once('exit', (code) => resolve(code)));
  try {
    await waitHealthy(base, 180_000);
    const recoveries: number[] = [];
    for (let i = 0; i < 3; i++) {
      const app = Number(execFileSync('pgrep', ['-P', String(start.pid)], { encoding: 'utf8' }).trim().split('\n')[0]);
      const t0 = performance.now();
      process.kill(app, 'SIGKILL');
      await new Promise((r) => setTimeout(r, 200));
      await waitHealthy(base, 120_000);
      recoveries.push((performance.now() - t0) / 1000);
    }
    const scenario = 'npm start, app process SIGKILLed 3 times';
    row(scenario, 'serving /healthz again after each kill', recoveries.map((s) => `${s.toFixed(1)} s`).join(', '), recoveries.every((s) => s < 60));
    start.kill('SIGINT');
    const code = await startExited;
    row(scenario, 'Ctrl-C (SIGINT) afterwards', `wrapper exited with code ${code}`, code === 0);
  } finally {
    if (start.exitCode === null) start.kill('SIGKILL');
  }
  return rows;
}
