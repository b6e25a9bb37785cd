// The plain poll of a run, which the app lets past the OpenAPI request validator: recognised only in
// the shape the contract checks nothing of but the id's length, and never built from a contract
// that asks more of the request.
import { readFileSync } from 'node:fs';
import type { Request } from 'express';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { openapiPath } from '../../api/src/app';
import { runPollRequest } from '../../api/src/lib/run-poll-request';

const doc = parse(readFileSync(openapiPath, 'utf8'));
const req = (method: string, url: string, headers: Record<string, string> = {}) => ({ method, url, headers }) as unknown as Request;

describe('runPollRequest', () => {
  const isRunPoll = runPollRequest(doc);
  const id = '3d9b6c1e-2f4a-4b8c-9d0e-7a6b5c4d3e2f';

  it('recognises GET /v1/runs/{id} with no query and no body, the id at most the documented length', () => {
    expect(isRunPoll(req('GET', `/v1/runs/${id}`))).toBe(true);
    expect(isRunPoll(req('GET', `/v1/runs/${'a'.repeat(100)}`))).toBe(true);
  });

  it('leaves every other request to the validator', () => {
    expect(isRunPoll(req('GET', `/v1/runs/${id}?verbose=1`))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/${id}?`))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/${'a'.repeat(101)}`))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/%61`))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/${id}/spec`))).toBe(false);
    expect(isRunPoll(req('GET', '/v1/runs/'))).toBe(false);
    expect(isRunPoll(req('HEAD', `/v1/runs/${id}`))).toBe(false);
    expect(isRunPoll(req('POST', `/v1/runs/${id}`))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/${id}`, { 'content-length': '2' }))).toBe(false);
    expect(isRunPoll(req('GET', `/v1/runs/${id}`, { 'transfer-encoding': 'chunked' }))).toBe(false);
  });

  it('refuses to be built from a contract that asks more of the poll', () => {
    const withQuery = structuredClone(doc);
    withQuery.paths['/v1/runs/{runId}'].get.parameters = [{ name: 'fields', in: 'query', schema: { type: 'string' } }];
    expect(() => runPollRequest(withQuery)).toThrow(/runPollRequest must learn/);
    const withFormat = structuredClone(doc);
    withFormat.components.parameters.RunId.schema = { type: 'string', maxLength: 100, format: 'uuid' };
    expect(() => runPollRequest(withFormat)).toThrow(/runPollRequest must learn/);
  });
});
