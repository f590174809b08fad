/** The one error type of the API: an HTTP status, a stable code and a readable sentence. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

/** 400 with field errors, as the validate middleware produces them. */
export const badRequest = (message: string, details?: Record<string, unknown>) =>
  new HttpError(400, 'invalid_request', message, details);

/** 404 for anything unknown or out of the caller's scope, so that ids never leak. */
export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} was not found.`);

/** 403 for a visible resource the caller's role may not change. */
export const forbidden = (message = 'Your role does not allow this.') =>
  new HttpError(403, 'forbidden', message);

/** 409 for a request that conflicts with what is stored. */
export const conflict = (message: string) => new HttpError(409, 'conflict', message);
