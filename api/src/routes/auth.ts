import type { Request, Response, Router } from 'express';
import { authenticate, authorize, unauthenticated } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { changePassword, signedInAccount, signOut, type ClientInfo } from '../services/account';
import { acceptInvitation } from '../services/members';
import { completePasswordReset, requestPasswordReset } from '../services/password-reset';
import { sessionView } from '../services/session-view';
import { CSRF_COOKIE, SESSION_COOKIE, createSession } from '../services/sessions';
import { signIn } from '../services/sign-in';

function setSessionCookies(ctx: AppContext, res: Response, token: string, csrf: string) {
  const common = { secure: ctx.config.cookieSecure, path: '/', maxAge: ctx.config.sessionMinutes * 60_000 };
  res.cookie(SESSION_COOKIE, token, { ...common, httpOnly: true, sameSite: 'lax' });
  // Readable by the console's script on purpose: it copies it into the X-CSRF-Token header.
  res.cookie(CSRF_COOKIE, csrf, { ...common, httpOnly: false, sameSite: 'strict' });
}

function clearSessionCookies(ctx: AppContext, res: Response) {
  res.clearCookie(SESSION_COOKIE, { path: '/', secure: ctx.config.cookieSecure, httpOnly: true, sameSite: 'lax' });
  res.clearCookie(CSRF_COOKIE, { path: '/', secure: ctx.config.cookieSecure, sameSite: 'strict' });
}

const clientOf = (req: Request): ClientInfo => ({ ip: req.ip ?? null, userAgent: req.get('user-agent') ?? null });

export function authRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.post('/v1/auth/sign-in', async (req, res) => {
    const { user, session, token } = await signIn(ctx, { email: req.body.email, password: req.body.password, ...clientOf(req) });
    setSessionCookies(ctx, res, token, session.csrfToken);
    res.json(await sessionView(ctx, user, session));
  });

  r.post('/v1/auth/sign-out', auth, authorize('account.self'), async (req, res) => {
    await signOut(ctx, req.principal!, clientOf(req));
    clearSessionCookies(ctx, res);
    res.status(204).end();
  });

  r.get('/v1/auth/session', auth, authorize('account.self'), async (req, res) => {
    if (req.principal!.kind !== 'session') throw unauthenticated('This route describes a signed-in session; API keys have none.');
    const { user, session } = await signedInAccount(ctx, req.principal!);
    res.json(await sessionView(ctx, user, session, req.principal));
  });

  r.post('/v1/auth/password', auth, authorize('account.self'), async (req, res) => {
    if (req.principal!.kind !== 'session') throw unauthenticated('Only a signed-in person can change a password.');
    const { user, session, token } = await changePassword(ctx, req.principal!, { currentPassword: req.body.currentPassword, newPassword: req.body.newPassword }, clientOf(req));
    setSessionCookies(ctx, res, token, session.csrfToken);
    res.json(await sessionView(ctx, user, session));
  });

  r.post('/v1/auth/password-reset', async (req, res) => {
    // Answered before any lookup so neither the body nor the timing says whether the address has an account.
    requestPasswordReset(ctx, { email: String(req.body.email), ip: req.ip ?? null }).catch((err) => ctx.log.error({ err }, 'password reset e-mail failed'));
    res.status(202).json({ status: 'accepted', detail: 'If an account uses this address, a reset link is on its way.' });
  });

  r.post('/v1/auth/password-reset/complete', async (req, res) => {
    await completePasswordReset(ctx, { token: req.body.token, password: req.body.password, ip: req.ip ?? null });
    res.status(204).end();
  });

  r.post('/v1/auth/invitations/accept', async (req, res) => {
    const user = await acceptInvitation(ctx, { token: req.body.token, password: req.body.password, name: req.body.name });
    const { session, token } = await createSession(ctx, user, clientOf(req));
    setSessionCookies(ctx, res, token, session.csrfToken);
    res.status(201).json(await sessionView(ctx, user, session));
  });

  return r;
}
