import type { RequestHandler } from 'express';
import ipaddr from 'ipaddr.js';
import type { Config } from '../config';
import { HttpProblem } from '../lib/problem';
import { safeEqual } from '../lib/secret-tokens';

function isLoopback(address: string | undefined): boolean {
  if (!address || !ipaddr.isValid(address)) return false;
  const ip = ipaddr.process(address);
  return ip.range() === 'loopback';
}

/**
 * `/metrics` tells the request mix, error rates and the process's memory: with METRICS_TOKEN set
 * it needs `Authorization: Bearer <token>` from everyone; without it only loopback clients (the
 * address Express reports, so behind a trusted proxy the forwarded client) are answered.
 */
export function metricsAccess(config: Pick<Config, 'metricsToken'>): RequestHandler {
  return (req, _res, next) => {
    if (config.metricsToken) {
      const presented = /^Bearer\s+(\S+)\s*$/i.exec(req.get('authorization') ?? '')?.[1];
      if (presented && safeEqual(presented, config.metricsToken)) return next();
      throw new HttpProblem({
        status: 401,
        slug: 'unauthenticated',
        title: 'Not signed in',
        detail: 'The metrics need "Authorization: Bearer <METRICS_TOKEN>".',
        headers: { 'WWW-Authenticate': 'Bearer realm="gridwright-metrics"' },
      });
    }
    if (isLoopback(req.ip)) return next();
    throw new HttpProblem({
      status: 403,
      slug: 'forbidden',
      title: 'Not allowed',
      detail: 'The metrics are served to loopback clients only; set METRICS_TOKEN to let a scraper elsewhere in with a bearer token.',
    });
  };
}
