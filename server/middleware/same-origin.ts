import type { NextFunction, Request, Response } from 'express';
import { HttpError } from '../http-error.js';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * CSRF defence for the cookie session: an unsafe method is refused when the browser says the
 * request comes from another site (Fetch Metadata), or its Origin is not ours. Clients that send
 * neither header are not browsers and cannot carry a victim's cookie across sites.
 */
export function sameOrigin(baseUrl: string) {
  const allowed = new URL(baseUrl).origin;
  return (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE.has(req.method)) return next();
    const site = req.get('sec-fetch-site');
    if (site && site !== 'same-origin' && site !== 'none') {
      throw new HttpError(403, 'cross_site', 'Requests from another site are refused.');
    }
    const origin = req.get('origin');
    if (origin && origin !== allowed && origin !== `${req.protocol}://${req.get('host')}`) {
      throw new HttpError(403, 'cross_site', 'Requests from another origin are refused.');
    }
    next();
  };
}
