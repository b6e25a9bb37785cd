import { Router } from 'express';

/**
 * The one way routers are made here. Express matches paths case-insensitively and with an optional
 * trailing slash unless told otherwise, while the OpenAPI document (and its validator) knows one
 * spelling of each path; a second spelling would reach a handler the contract never saw. So every
 * router answers exactly the documented spelling, and `buildApp` sets the same on the app.
 */
export const STRICT_ROUTING = { caseSensitive: true, strict: true } as const;

export const strictRouter = (): Router => Router(STRICT_ROUTING);
