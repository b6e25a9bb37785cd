import type { Request, Response } from 'express';

const HTTP_METHODS = ['get', 'put', 'post', 'delete', 'patch', 'head', 'options'] as const;

interface OperationPattern {
  method: string;
  path: RegExp;
  secured: boolean;
}

export interface DocumentedOperations {
  /** True when some operation of the document has exactly this path (any method): one spelling, as the routers match. */
  isDocumentedPath(path: string): boolean;
  /** True when the request names an operation that needs a key or a session. */
  needsCredentials(req: Pick<Request, 'method' | 'path'>): boolean;
}

const escapeRegExp = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** `/v1/runs/{runId}/cancel` → a case-sensitive pattern for exactly that path, no trailing slash. */
function pathPattern(template: string): RegExp {
  return new RegExp(`^${template.split(/\{[^}]+\}/).map(escapeRegExp).join('[^/]+')}$`);
}

const hasCredentials = (security: unknown) => Array.isArray(security) && security.some((s: object) => Object.keys(s).length > 0);

/** The operations of an OpenAPI document, for deciding about a request before its body is read. */
export function documentedOperations(doc: Record<string, any>): DocumentedOperations {
  const patterns: OperationPattern[] = [];
  for (const [template, item] of Object.entries<Record<string, any>>(doc.paths ?? {})) {
    for (const method of HTTP_METHODS) {
      const op = item[method];
      if (op) patterns.push({ method: method.toUpperCase(), path: pathPattern(template), secured: hasCredentials(op.security ?? doc.security) });
    }
  }
  return {
    isDocumentedPath: (path) => patterns.some((p) => p.path.test(path)),
    needsCredentials: (req) => patterns.some((p) => p.secured && p.method === req.method && p.path.test(req.path)),
  };
}

/**
 * Before refusing a request whose body has not arrived, ask the client to close the connection:
 * otherwise Node reads the rest of the body (and throws it away) to keep the connection alive.
 */
export function closeIfBodyUnread(req: Request, res: Response): void {
  const hasBody = Number(req.get('content-length') ?? 0) > 0 || req.get('transfer-encoding') !== undefined;
  if (hasBody && !req.complete) res.setHeader('Connection', 'close');
}
