import { Counter, Histogram, Registry, collectDefaultMetrics } from 'prom-client';

/** One registry per process (tests build several apps in one process, so nothing is global). */
export function createMetrics() {
  const registry = new Registry();
  collectDefaultMetrics({ register: registry, prefix: 'gridwright_' });
  return {
    registry,
    httpDuration: new Histogram({
      name: 'gridwright_http_request_duration_seconds',
      help: 'HTTP request duration by route and status',
      labelNames: ['method', 'route', 'status'] as const,
      buckets: [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5],
      registers: [registry],
    }),
    bodiesParsed: new Counter({
      name: 'gridwright_http_bodies_parsed_total',
      help: 'JSON request bodies read and parsed, by whether the caller was authenticated first',
      labelNames: ['caller'] as const,
      registers: [registry],
    }),
    solves: new Counter({
      name: 'gridwright_solves_total',
      help: 'Solver runs by outcome',
      labelNames: ['outcome'] as const,
      registers: [registry],
    }),
    solveSeconds: new Histogram({
      name: 'gridwright_solve_seconds',
      help: 'Wall time of one run in the solver',
      buckets: [0.05, 0.1, 0.5, 1, 5, 15, 30, 60, 120, 300],
      registers: [registry],
    }),
  };
}

export type Metrics = ReturnType<typeof createMetrics>;
