import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import { z } from 'zod';
import { HttpError } from '../http-error.js';
import { validate } from '../middleware/validate.js';
import type { Services } from '../services/index.js';
import { email, password } from './schemas.js';

/** Reset requests one address may send per 15 minutes, whatever the e-mail addresses (product choice). */
export const RESET_REQUESTS_PER_ADDRESS = 20;

const requestBody = z.strictObject({ email });
// Any token shape reaches the service, so a mangled link gets the same sentence as an expired one.
const tokenParams = z.object({ token: z.string().min(1).max(200) });

/** /api/auth/password-reset: public routes to ask for a reset link, check it and set a new password with it. */
export function passwordResetRoutes(services: Services) {
  const router = Router();
  const windowMs = 15 * 60_000;
  // Every request counts (each may send a mail); the per-account limit lives in the service and is silent.
  const perAddress = rateLimit({
    windowMs,
    limit: RESET_REQUESTS_PER_ADDRESS,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: () => {
      throw new HttpError(429, 'rate_limited', 'Too many password reset requests from this address. Please wait up to 15 minutes and try again.');
    },
  });

  // 202 whether or not the address has an account; the work runs after the answer, so the answer takes as long either way.
  router.post('/', perAddress, validate({ body: requestBody }), (req, res) => {
    services.passwordReset.requestInBackground((res.locals.body as z.infer<typeof requestBody>).email, req.ip ?? null);
    res.status(202).json({ message: 'If an account exists for that address, we have sent a link to reset its password. It works for one hour.' });
  });

  router.get('/:token', validate({ params: tokenParams }), async (_req, res) => {
    await services.passwordReset.check(res.locals.params.token);
    res.status(204).end();
  });

  router.post('/:token', validate({ params: tokenParams, body: z.strictObject({ password }) }), async (_req, res) => {
    await services.passwordReset.reset(res.locals.params.token, res.locals.body.password);
    res.status(204).end();
  });

  return router;
}
