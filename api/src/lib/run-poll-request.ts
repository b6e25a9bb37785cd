import type { Request } from 'express';

const POLLED_PATH = '/v1/runs/{runId}';

/**
 * Recognises the request clients poll with, `GET /v1/runs/{runId}` with no query and no body, as
 * one the OpenAPI request validator would pass, so the app need not ask it: measured at 50
 * connections, the validator took a tenth of an API process's time on this request. The contract
 * checks nothing of it but its path parameter, a string of at most `maxLength` characters, which a
 * segment of that many characters without percent-escapes always is. Built from the document, and
 * refusing to build when the operation asks for more, so a change to the contract cannot be skipped.
 */
export function runPollRequest(doc: Record<string, any>): (req: Request) => boolean {
  const item = doc.paths?.[POLLED_PATH];
  const op = item?.get;
  const resolve = (p: any) => (typeof p?.$ref === 'string' ? p.$ref.split('/').slice(1).reduce((o: any, k: string) => o?.[k], doc) : p);
  const params = [...(item?.parameters ?? []), ...(op?.parameters ?? [])].map(resolve);
  const runId = params[0];
  const schemaKeys = Object.keys(runId?.schema ?? {}).sort().join(',');
  if (!op || op.requestBody || params.length !== 1 || runId.in !== 'path' || runId.name !== 'runId' || schemaKeys !== 'maxLength,type' || runId.schema.type !== 'string') {
    throw new Error(`${POLLED_PATH} asks for more than a path parameter of bounded length; runPollRequest must learn to check it`);
  }
  const path = new RegExp(`^/v1/runs/[^/%?#]{1,${Number(runId.schema.maxLength)}}$`);
  return (req) => req.method === 'GET' && path.test(req.url) && req.headers['content-length'] === undefined && req.headers['transfer-encoding'] === undefined;
}
