import type { NextFunction, Request, Response } from 'express';
import type { Actor } from '../auth/actor.js';
import type { Sessions } from '../auth/sessions.js';
import type { Role } from '../entities/user.entity.js';
import { HttpError } from '../http-error.js';

/** Reads the session cookie; sets `res.locals.actor` and refreshes the cookie when Lucia extends the session. */
export function loadSession(sessions: Sessions) {
  return async (req: Request, res: Response, next: NextFunction) => {
    const sessionId = req.cookies?.[sessions.sessionCookieName] as string | undefined;
    if (!sessionId) return next();
    const { session, user } = await sessions.validateSession(sessionId);
    if (!session || !user) {
      res.append('Set-Cookie', sessions.createBlankSessionCookie().serialize());
      return next();
    }
    if (session.fresh) res.append('Set-Cookie', sessions.createSessionCookie(session.id).serialize());
    const attrs = user as unknown as Actor & { status: string };
    if (attrs.status !== 'active') {
      await sessions.invalidateSession(session.id);
      res.append('Set-Cookie', sessions.createBlankSessionCookie().serialize());
      return next();
    }
    res.locals.actor = { id: user.id, email: attrs.email, name: attrs.name, role: attrs.role, organizationId: attrs.organizationId } satisfies Actor;
    res.locals.sessionId = session.id;
    next();
  };
}

/** Refuses anonymous callers with 401. */
export function authenticate(_req: Request, res: Response, next: NextFunction) {
  if (!res.locals.actor) throw new HttpError(401, 'unauthenticated', 'Please sign in first.');
  next();
}

/** Refuses signed-in callers whose role is not listed, with 403. */
export function requireRole(...roles: Role[]) {
  return (_req: Request, res: Response, next: NextFunction) => {
    const actor = res.locals.actor as Actor | undefined;
    if (!actor) throw new HttpError(401, 'unauthenticated', 'Please sign in first.');
    if (!roles.includes(actor.role)) throw new HttpError(403, 'forbidden', 'Your role does not allow this.');
    next();
  };
}

/** The signed-in actor of a request that passed `authenticate`. */
export function actorOf(res: Response): Actor {
  const actor = res.locals.actor as Actor | undefined;
  if (!actor) throw new HttpError(401, 'unauthenticated', 'Please sign in first.');
  return actor;
}
