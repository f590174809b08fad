import { Router, type Request, type Response } from 'express';
import { rateLimit, type Options, type RateLimitInfo } from 'express-rate-limit';
import { z } from 'zod';
import type { Config } from '../config.js';
import { HttpError } from '../http-error.js';
import { actorOf, authenticate } from '../middleware/authenticate.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { email, password } from './schemas.js';

const signInBody = z.strictObject({ email, password: z.string().min(1).max(1024) });
const changePasswordBody = z.strictObject({ currentPassword: z.string().min(1).max(1024), newPassword: password });

/** /api/auth: sign in, sign out, me, change password. */
export function authRoutes(services: Services, config: Config) {
  const router = Router();
  const windowMs = 15 * 60_000;
  // Both limits answer with Retry-After (RFC 9110 §10.2.3): the seconds until the window of the
  // limit that refused ends, and the sentence says the same wait in minutes.
  const limited = (req: Request, res: Response, _next: unknown, options: Options) => {
    const info = (req as unknown as Record<string, RateLimitInfo | undefined>)[options.requestPropertyName];
    const resetAt = info?.resetTime?.getTime() ?? Date.now() + windowMs;
    const seconds = Math.max(1, Math.ceil((resetAt - Date.now()) / 1000));
    const minutes = Math.ceil(seconds / 60);
    res.setHeader('Retry-After', String(seconds));
    throw new HttpError(429, 'rate_limited', `Too many sign-in attempts. Please wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`);
  };
  // Two limits on failed attempts: per address (guessing many accounts from one place) and per
  // account (one account from many places). Successful sign-ins do not count, so that a whole
  // shift signing in behind one office address is never locked out.
  const perAddress = rateLimit({ windowMs, limit: config.signInLimits.perAddress, skipSuccessfulRequests: true, standardHeaders: 'draft-8', legacyHeaders: false, handler: limited });
  const perAccount = rateLimit({
    windowMs,
    limit: config.signInLimits.perAccount,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req) => `account:${String(req.body?.email ?? '').toLowerCase()}`,
    handler: limited,
  });

  router.post('/sign-in', perAddress, validate({ body: signInBody }), perAccount, async (_req, res) => {
    const { email: e, password: p } = res.locals.body as z.infer<typeof signInBody>;
    const { session, user } = await services.users.signIn(e, p);
    res.append('Set-Cookie', session.serialize());
    res.json({ user });
  });

  router.post('/sign-out', async (_req, res) => {
    if (res.locals.sessionId) res.append('Set-Cookie', (await services.users.signOut(res.locals.sessionId)).serialize());
    res.status(204).end();
  });

  router.get('/me', authenticate, async (_req, res) => {
    res.json({ user: await services.users.me(actorOf(res)) });
  });

  router.post('/change-password', authenticate, validate({ body: changePasswordBody }), async (_req, res) => {
    const body = res.locals.body as z.infer<typeof changePasswordBody>;
    await services.users.changePassword(actorOf(res), res.locals.sessionId, body.currentPassword, body.newPassword);
    res.status(204).end();
  });

  return router;
}
