import type { RequestHandler } from 'express';
import type { AppContext } from '../context';
import { closeIfBodyUnread, type DocumentedOperations } from '../lib/documented-operations';
import { authenticate } from './middleware';

/**
 * Authenticates requests to operations that need credentials before their body is read, so an
 * unknown caller costs the headers, not the parsing and validation of megabytes. The routers
 * authenticate again; `authenticate` keeps a principal it finds already set.
 */
export function authenticateFirst(ctx: AppContext, operations: DocumentedOperations): RequestHandler {
  const auth = authenticate(ctx);
  return (req, res, next) => {
    if (!operations.needsCredentials(req)) return next();
    const refuse = (err: unknown) => {
      closeIfBodyUnread(req, res);
      next(err);
    };
    Promise.resolve(auth(req, res, (err?: unknown) => (err ? refuse(err) : next()))).catch(refuse);
  };
}
