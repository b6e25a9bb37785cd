// express-openapi-validator 5.6.2 finds the operation of a request by compiling the pattern of
// every documented path with path-to-regexp, on every request, until one matches (`lookupRoute` in
// its openapi.metadata.js): measured, a twelfth of an API process's time at 50 connections on
// `GET /v1/runs/{runId}`, the 35th path of the document. The patterns are the document's and never
// change, so each is compiled once. The validator reads `pathToRegexp` from the exports of the
// path-to-regexp copy it resolves, at every call; that copy's exports are the ones wrapped here.
import { createRequire } from 'node:module';

type CompilePattern = (path: unknown, options?: object) => { regexp: RegExp; keys: unknown[] };

/** Far above the patterns of one document: beyond it nothing more is kept. */
const MAX_PATTERNS = 1000;

let installed = false;

export function compileOpenApiRoutePatternsOnce(): void {
  if (installed) return;
  installed = true;
  const validatorRequire = createRequire(createRequire(import.meta.url).resolve('express-openapi-validator'));
  const exports = validatorRequire('path-to-regexp') as { pathToRegexp: CompilePattern };
  const compile = exports.pathToRegexp;
  // By pattern, then by the options' values (the validator passes a fresh object each time).
  const compiled = new Map<string, { options: object; result: ReturnType<CompilePattern> }[]>();
  let kept = 0;
  exports.pathToRegexp = (path, options = {}) => {
    if (typeof path !== 'string') return compile(path, options);
    const forPath = compiled.get(path) ?? [];
    const found = forPath.find((c) => sameOptions(c.options, options));
    if (found) return found.result;
    const result = compile(path, options);
    if (kept++ < MAX_PATTERNS) compiled.set(path, [...forPath, { options: { ...options }, result }]);
    return result;
  };
}

function sameOptions(a: object, b: object): boolean {
  const x = a as Record<string, unknown>;
  const y = b as Record<string, unknown>;
  for (const k in x) if (x[k] !== y[k]) return false;
  for (const k in y) if (!(k in x)) return false;
  return true;
}
