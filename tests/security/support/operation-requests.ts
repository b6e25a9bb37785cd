import { randomUUID } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import { fillPath, resolveRef, type Operation } from './openapi-operations';

/** Who sends a request: a signed-in person (cookie + CSRF token), an API key, or nobody. */
export type Actor =
  | { kind: 'session'; label: string; cookie: string; csrf: string; tenantHeader?: string }
  | { kind: 'key'; label: string; key: string; tenantHeader?: string }
  | { kind: 'anonymous'; label: string };

/** A tiny SCADA export for multipart uploads (two hourly values, kW). */
export const SMALL_SERIES_CSV = 'timestamp,pv [kW]\n2027-03-01T00:00:00+01:00,10\n2027-03-01T01:00:00+01:00,12\n';

/** The request body the OpenAPI document gives as its example, so a request passes validation and reaches authorization. */
export function exampleBody(doc: Record<string, any>, op: Operation): { contentType: string; body: unknown } | null {
  const rb = resolveRef(doc, op.raw.requestBody ?? {});
  const content: Record<string, any> = rb.content ?? {};
  const [contentType] = Object.keys(content);
  if (!contentType) return null;
  if (contentType.startsWith('multipart/')) return { contentType, body: SMALL_SERIES_CSV };
  const media = content[contentType];
  if (media.example !== undefined) return { contentType, body: media.example };
  const first = media.examples ? resolveRef(doc, Object.values<any>(media.examples)[0]) : undefined;
  if (first?.value !== undefined) return { contentType, body: first.value };
  const schema = resolveRef(doc, media.schema ?? {});
  if (schema?.example !== undefined) return { contentType, body: schema.example };
  return { contentType, body: {} };
}

/** Values for the path parameters that name nothing: their documented example, or a fresh UUID. */
export function unknownIds(op: Operation): Record<string, string> {
  const out: Record<string, string> = {};
  for (const name of op.pathParams) {
    const param = (op.raw.parameters as any[]).find((p) => p?.in === 'path' && p.name === name);
    const schema = param?.schema ?? {};
    out[name] = schema.format === 'uuid' || !param?.example ? randomUUID() : String(param.example).replace(/[0-9a-f]{6}$/, randomUUID().slice(0, 6));
  }
  return out;
}

/** Sends `op` as `actor` with the given path values and the document's example body. */
export function send(app: Express, doc: Record<string, any>, op: Operation, actor: Actor, pathValues: Record<string, string>, body?: unknown): request.Test {
  return sendTo(app, doc, op, actor, fillPath(op.path, pathValues), body);
}

/** The same to a URL of one's own, e.g. another spelling of the operation's path. */
export function sendTo(app: Express, doc: Record<string, any>, op: Operation, actor: Actor, url: string, body?: unknown): request.Test {
  let req = (request(app) as any)[op.method](url).set('Accept', 'application/json') as request.Test;
  if (actor.kind === 'session') {
    req = req.set('Cookie', actor.cookie).set('X-CSRF-Token', actor.csrf);
  } else if (actor.kind === 'key') {
    req = req.set('Authorization', `Bearer ${actor.key}`);
  }
  if (actor.kind !== 'anonymous' && actor.tenantHeader) req = req.set('X-Tenant-Id', actor.tenantHeader);
  const example = exampleBody(doc, op);
  if (example?.contentType.startsWith('multipart/')) return req.attach('file', Buffer.from(SMALL_SERIES_CSV), { filename: 'series.csv', contentType: 'text/csv' });
  if (example || body !== undefined) return req.set('Content-Type', example?.contentType ?? 'application/json').send(JSON.stringify(body ?? example!.body));
  return req;
}

/** The collection a path parameter indexes: `/v1/runs/{runId}/cancel` → `/v1/runs` for `runId`. */
export function collectionOf(path: string, param: string): string {
  return path.slice(0, path.indexOf(`/{${param}}`));
}
