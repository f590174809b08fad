import type { NextFunction, Request, Response } from 'express';
import { HttpError } from '../http-error.js';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * The one unsafe route that takes requests from other sites: the report's one-click unsubscribe,
 * POST /api/unsubscribe/:token. RFC 8058 has the mail provider POST it (from its servers, or from
 * the reader's webmail page, i.e. cross-site and without our Origin). It is safe to let through:
 * the route never reads the session cookie, its authority is the signed token in the address, and
 * its one effect (this recipient stops receiving the report) is what anyone holding the link may
 * do anyway, so a forged cross-site request gains nothing a copied link would not.
 */
const CROSS_SITE_ALLOWED = /^\/unsubscribe\/[^/]+\/?$/;

/**
 * CSRF defence for the cookie session: an unsafe method is refused when the browser says the
 * request comes from another site (Fetch Metadata), or its Origin is not ours. Clients that send
 * neither header are not browsers and cannot carry a victim's cookie across sites.
 */
export function sameOrigin(baseUrl: string) {
  const allowed = new URL(baseUrl).origin;
  return (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE.has(req.method)) return next();
    if (req.method === 'POST' && CROSS_SITE_ALLOWED.test(req.path)) return next();
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
