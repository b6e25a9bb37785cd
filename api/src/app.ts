import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import cookieParser from 'cookie-parser';
import express, { type Express, type RequestHandler } from 'express';
import * as OpenApiValidator from 'express-openapi-validator';
import helmet from 'helmet';
import swaggerUi from 'swagger-ui-express';
import { parse as parseYaml } from 'yaml';
import { authenticateFirst } from './auth/authenticate-first';
import { metricsAccess } from './auth/metrics-access';
import type { AppContext } from './context';
import { databaseReadiness } from './db/data-source';
import { closeIfBodyUnread, documentedOperations } from './lib/documented-operations';
import { errorHandler, notFoundHandler } from './lib/error-handler';
import { compileOpenApiRoutePatternsOnce } from './lib/openapi-route-patterns';
import { HttpProblem, problemType } from './lib/problem';
import { requestLog } from './lib/request-log';
import { runPollRequest } from './lib/run-poll-request';
import { STRICT_ROUTING, strictRouter } from './lib/strict-router';
import { adminBillingRouter } from './routes/admin-billing';
import { adminTenantsRouter } from './routes/admin-tenants';
import { apiKeysRouter } from './routes/api-keys';
import { auditRouter } from './routes/audit';
import { authRouter } from './routes/auth';
import { billingRouter } from './routes/billing';
import { membersRouter } from './routes/members';
import { outboxRouter } from './routes/outbox';
import { paymentEventsRouter } from './routes/payment-events';
import { tenantRouter } from './routes/tenant';
import { usageRouter } from './routes/usage';
import { exportProfilesRouter } from './routes/export-profiles';
import { revisionsRouter } from './routes/revisions';
import { runsRouter } from './routes/runs';
import { seriesRouter } from './routes/series';
import { specsRouter } from './routes/specs';
import { studiesRouter } from './routes/studies';
import { webhookEndpointsRouter } from './routes/webhook-endpoints';

const here = path.dirname(fileURLToPath(import.meta.url));
export const openapiPath = path.resolve(here, '../../openapi/openapi.yaml');
const consoleDist = path.resolve(here, '../../console/dist');

/**
 * Routes anyone may call (sign-in, password reset, invitations) take small bodies; BODY_LIMIT
 * applies once the caller is authenticated.
 */
export const PUBLIC_BODY_LIMIT_BYTES = 64 * 1024;

/** Every spelling of the API's prefix, so none slips past the contract: `/v1`, `/V1/…`. */
export const isApiPath = (p: string) => /^\/v1(?:\/|$)/i.test(p);

/** Builds the Express app without listening: what server.ts and the tests use. */
export function buildApp(ctx: AppContext): Express {
  const app = express();
  const openapiText = readFileSync(openapiPath, 'utf8');
  const openapiDoc = parseYaml(openapiText);
  // The request validator accepts any JSON value as a site spec: zod owns those bodies
  // (shared/src/site-spec.ts), checks the cross-field rules too and names every field with an
  // RFC 6901 pointer, and a body should meet one validator, not two wording the same error apart.
  // Readers (/openapi.yaml, /docs) get the full schema.
  const validatorDoc = structuredClone(openapiDoc);
  validatorDoc.components.schemas.SiteSpec = {};

  app.disable('x-powered-by');
  app.set('case sensitive routing', STRICT_ROUTING.caseSensitive);
  app.set('strict routing', STRICT_ROUTING.strict);
  app.set('trust proxy', ctx.config.trustProxy);
  app.set('query parser', 'extended');

  app.use(requestLog(ctx.log, { ignore: (url) => url === '/healthz' || url === '/metrics' }));
  app.use(
    helmet({
      // Behind plain http on loopback, upgrading requests or pinning HSTS would break the console.
      strictTransportSecurity: ctx.config.cookieSecure,
      contentSecurityPolicy: {
        directives: {
          'upgrade-insecure-requests': ctx.config.cookieSecure ? [] : null,
          'font-src': ["'self'", 'data:'],
          'default-src': ["'self'"],
          'img-src': ["'self'", 'data:'],
          'style-src': ["'self'", "'unsafe-inline'"],
          'script-src': ["'self'"],
          'connect-src': ["'self'"],
          'frame-ancestors': ["'none'"],
        },
      },
    }),
  );
  app.use((req, res, next) => {
    const end = ctx.metrics.httpDuration.startTimer();
    res.on('finish', () => {
      const route = req.route?.path ? `${req.baseUrl}${req.route.path}` : 'unmatched';
      end({ method: req.method, route, status: String(res.statusCode) });
    });
    next();
  });

  // Health, metrics, the document and the payment provider's hooks: outside /v1, so an API request
  // leaves their router at its first check instead of trying each of their routes in turn.
  const outsideApi = strictRouter();
  outsideApi.use((req, _res, next) => next(isApiPath(req.path) ? 'router' : undefined));
  outsideApi.get('/healthz', (_req, res) => {
    res.json({ status: 'ok' });
  });
  outsideApi.get('/readyz', async (_req, res) => {
    const ready = await databaseReadiness(ctx.db);
    if (ready.ok) return res.json({ status: 'ready' });
    res
      .status(503)
      .type('application/problem+json')
      .setHeader('Retry-After', '5')
      .send(JSON.stringify({ type: problemType('not-ready'), title: 'Not ready', status: 503, detail: ready.reason }));
  });
  outsideApi.get('/metrics', metricsAccess(ctx.config), async (_req, res) => {
    res.type(ctx.metrics.registry.contentType).send(await ctx.metrics.registry.metrics());
  });
  outsideApi.get('/openapi.yaml', (_req, res) => {
    res.type('application/yaml').send(openapiText);
  });
  outsideApi.use('/docs', swaggerUi.serve, swaggerUi.setup(openapiDoc, { customSiteTitle: 'Gridwright API' }));
  // Signed by the payment provider and read raw, before any parser: see routes/payment-events.ts.
  outsideApi.use(paymentEventsRouter(ctx));

  app.use(outsideApi);

  // Another spelling of a documented path (`/V1/…`, a trailing slash) is refused before anything
  // else looks at it, so it can never meet a handler the contract did not describe.
  const operations = documentedOperations(openapiDoc);
  app.use((req, res, next) => {
    if (!isApiPath(req.path) || operations.isDocumentedPath(req.path)) return next();
    closeIfBodyUnread(req, res);
    notFoundHandler(req, res, next);
  });
  app.use(cookieParser());
  app.use(authenticateFirst(ctx, operations));
  const JSON_TYPES = ['application/json', 'application/*+json'];
  const jsonBody = (limit: number, caller: 'authenticated' | 'public') => ({
    limit,
    parse: express.json({ limit, type: JSON_TYPES, verify: () => ctx.metrics.bodiesParsed.inc({ caller }) }),
  });
  const authenticatedBody = jsonBody(ctx.config.bodyLimitBytes, 'authenticated');
  const publicBody = jsonBody(PUBLIC_BODY_LIMIT_BYTES, 'public');
  app.use((req, res, next) => {
    const body = req.principal ? authenticatedBody : publicBody;
    // A JSON body is refused on its declared length, before a byte is read: the parser would drain it all first.
    const declared = Number(req.get('content-length') ?? 0);
    if (declared > body.limit && req.is(JSON_TYPES)) {
      closeIfBodyUnread(req, res);
      throw new HttpProblem({
        status: 413,
        slug: 'payload-too-large',
        title: 'Request body too large',
        detail: `The body is ${declared} bytes; the limit is ${body.limit} bytes.`,
      });
    }
    body.parse(req, res, next);
  });
  compileOpenApiRoutePatternsOnce();
  const isRunPoll = runPollRequest(validatorDoc);
  const validateRequest = OpenApiValidator.middleware({
    apiSpec: validatorDoc,
    validateRequests: { allErrors: true, removeAdditional: false },
    validateResponses: false,
    validateSecurity: false,
    fileUploader: false,
    ignorePaths: (p: string) => !isApiPath(p),
  });
  // Each of the validator's steps is asked unless the request is a plain poll (lib/run-poll-request.ts).
  app.use(validateRequest.map((step): RequestHandler => (req, res, next) => (isRunPoll(req) ? next() : step(req, res, next))));

  // Resource routers are mounted here, one per resource (see DEVELOPERS.md). Their paths do not
  // overlap; runs come first because clients poll GET /v1/runs/{id}, and every router before it
  // tries its routes on each poll.
  app.use(runsRouter(ctx));
  app.use(authRouter(ctx));
  app.use(membersRouter(ctx));
  app.use(apiKeysRouter(ctx));
  app.use(tenantRouter(ctx));
  app.use(usageRouter(ctx));
  app.use(auditRouter(ctx));
  app.use(adminTenantsRouter(ctx));
  app.use(billingRouter(ctx));
  app.use(adminBillingRouter(ctx));
  app.use(outboxRouter(ctx));
  app.use(revisionsRouter(ctx));
  app.use(studiesRouter(ctx));
  app.use(specsRouter(ctx));
  app.use(seriesRouter(ctx));
  app.use(webhookEndpointsRouter(ctx));
  app.use(exportProfilesRouter(ctx));

  if (existsSync(path.join(consoleDist, 'index.html'))) {
    app.use(express.static(consoleDist, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (req, res, next) => {
      if (isApiPath(req.path) || !req.accepts('html')) return next();
      res.sendFile(path.join(consoleDist, 'index.html'));
    });
  }

  app.use(notFoundHandler);
  app.use(errorHandler(ctx.log));
  return app;
}
