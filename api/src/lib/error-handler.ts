import type { ErrorRequestHandler, RequestHandler } from 'express';
import { escapeToken, unescapeToken } from '@gridwright/shared/json-pointer';
import type { Logger } from './logger';
import { HttpProblem, problemType, type ProblemBody, type ProblemFieldError } from './problem';

const PROBLEM_JSON = 'application/problem+json';

/** express-openapi-validator reports `/body/a/0/b` (or `.body.a[0].b`); clients want a pointer into the body. */
export function validatorPathToPointer(path: string | undefined): string {
  if (!path) return '';
  const normalised = path.startsWith('/')
    ? path
    : '/' + path.replace(/^\./, '').replace(/\[(\d+)\]/g, '.$1').split('.').join('/');
  return normalised.replace(/^\/body(?=\/|$)/, '');
}

/**
 * For unknown properties the validator appends the client's property name to the (escaped) instance
 * path as it is, so `{"~": 0}` gave `/~`. Find the name in the body and escape it per RFC 6901.
 */
export function escapeUnknownProperty(pointer: string, body: unknown): string {
  const tokens = pointer.split('/').slice(1);
  let node: unknown = body;
  for (let i = 0; i < tokens.length && node && typeof node === 'object'; i++) {
    const rest = tokens.slice(i).join('/');
    if (Object.prototype.hasOwnProperty.call(node, rest)) return `${tokens.slice(0, i).map((t) => `/${t}`).join('')}/${escapeToken(rest)}`;
    node = (node as Record<string, unknown>)[unescapeToken(tokens[i])];
  }
  return pointer;
}

function send(res: Parameters<ErrorRequestHandler>[2], body: ProblemBody, headers: Record<string, string> = {}) {
  for (const [k, v] of Object.entries(headers)) res.setHeader(k, v);
  res.status(body.status).type(PROBLEM_JSON).send(JSON.stringify(body));
}

export const notFoundHandler: RequestHandler = (req, res) => {
  send(res, {
    type: problemType('not-found'),
    title: 'Not found',
    status: 404,
    detail: `No route ${req.method} ${req.path}.`,
  });
};

const UNAVAILABLE_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', '57P01', '57P02', '57P03', '08000', '08001', '08003', '08006']);

/** A dropped or refused connection to PostgreSQL: the client should retry, not report a bug. */
export function isDatabaseUnavailable(err: any): boolean {
  const code = err?.code ?? err?.driverError?.code ?? err?.cause?.code;
  if (code && UNAVAILABLE_CODES.has(code)) return true;
  const message = String(err?.message ?? '');
  return /Connection terminated|timeout exceeded when trying to connect|the database system is (shutting down|starting up)/i.test(message);
}

export function errorHandler(log: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    if (res.headersSent) return;
    // The RFC 9457 members win over same-named extensions (an extension `status: "queued"` once made res.status throw).
    if (err instanceof HttpProblem) return send(res, { ...err.toBody(req.originalUrl), type: err.type, title: err.title, status: err.status, detail: err.message }, err.headers);

    const status: number | undefined = err?.status ?? err?.statusCode;
    // body-parser
    if (err?.type === 'entity.too.large') {
      return send(res, {
        type: problemType('payload-too-large'),
        title: 'Request body too large',
        status: 413,
        detail: `The body is ${err.length} bytes; the limit is ${err.limit} bytes.`,
      });
    }
    if (err?.type === 'entity.parse.failed') {
      return send(res, {
        type: problemType('malformed-json'),
        title: 'The body is not valid JSON',
        status: 400,
        detail: String(err.message ?? 'Unexpected token').slice(0, 300),
        errors: [{ pointer: '', message: 'not valid JSON' }],
      });
    }
    // express-openapi-validator
    if (status && Array.isArray(err?.errors)) {
      const errors: ProblemFieldError[] = err.errors.map((e: { path?: string; message?: string; errorCode?: string }) => {
        const pointer = validatorPathToPointer(e.path);
        const unknownName = /^(additionalProperties|unevaluatedProperties)\./.test(e.errorCode ?? '') && e.path?.startsWith('/body');
        return { pointer: unknownName ? escapeUnknownProperty(pointer, req.body) : pointer, message: e.message ?? 'invalid' };
      });
      const bySlug: Record<number, [string, string]> = {
        400: ['validation-failed', 'The request is not valid'],
        404: ['not-found', 'Not found'],
        405: ['method-not-allowed', 'Method not allowed'],
        413: ['payload-too-large', 'Request body too large'],
        415: ['unsupported-media-type', 'Unsupported media type'],
      };
      const [slug, title] = bySlug[status] ?? ['bad-request', 'Bad request'];
      if (status === 404) return notFoundHandler(req, res, () => {});
      return send(res, {
        type: problemType(slug),
        title,
        status,
        detail:
          status === 400
            ? `${errors.length} field${errors.length === 1 ? '' : 's'} failed validation: ${errors.map((e) => `${e.pointer || '(body)'} ${e.message}`).join('; ')}`
            : String(err.message ?? title),
        ...(status === 400 ? { errors } : {}),
      });
    }
    if (status && status >= 400 && status < 500) {
      return send(res, { type: 'about:blank', title: 'Bad request', status, detail: String(err.message ?? 'Bad request').slice(0, 300) });
    }

    if (isDatabaseUnavailable(err)) {
      log.warn({ reqId: req.id, code: err?.code }, 'database unavailable');
      return send(
        res,
        {
          type: problemType('service-unavailable'),
          title: 'Temporarily unavailable',
          status: 503,
          detail: 'The database cannot be reached right now. Nothing was changed; retry shortly.',
        },
        { 'Retry-After': '5' },
      );
    }

    log.error({ err, reqId: req.id }, 'unhandled error');
    send(res, {
      type: problemType('internal'),
      title: 'Internal error',
      status: 500,
      detail: `Something went wrong on our side. Quote request id ${String(req.id ?? '')} when reporting it.`,
    });
  };
}
