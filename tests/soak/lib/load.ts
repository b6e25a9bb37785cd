import autocannon from 'autocannon';

export interface LoadFigures {
  label: string;
  requestsPerSecond: number;
  p50Ms: number;
  p99Ms: number;
  requests: number;
  errors: number;
  non2xx: number;
}

/** One autocannon run against a loopback URL (never anything else). */
export async function measure(
  label: string,
  opts: { url: string; method?: 'GET' | 'POST'; headers?: Record<string, string>; body?: string; connections?: number; durationSeconds?: number },
): Promise<LoadFigures> {
  if (!/^http:\/\/127\.0\.0\.1:\d+\//.test(opts.url)) throw new Error(`load only against 127.0.0.1, not ${opts.url}`);
  const result = await autocannon({
    url: opts.url,
    method: opts.method ?? 'GET',
    headers: opts.headers,
    body: opts.body,
    connections: opts.connections ?? 50,
    duration: opts.durationSeconds ?? 10,
  });
  return {
    label,
    requestsPerSecond: result.requests.average,
    p50Ms: result.latency.p50,
    p99Ms: result.latency.p99,
    requests: result.requests.total,
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
  };
}
