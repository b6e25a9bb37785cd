import { pino, type Logger } from 'pino';

export type { Logger };

export function createLogger(level: string): Logger {
  // Written asynchronously: under load the lines of many requests leave in one write instead of one
  // blocking write each (measured: a fifth of an API process's time at 50 connections went to
  // writing log lines). pino writes out what is still buffered when the process exits.
  return pino({ level, base: { service: 'gridwright' }, redact: ['req.headers.authorization', 'req.headers.cookie'] }, pino.destination({ sync: false }));
}
