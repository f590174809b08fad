import { appConfig } from '@/config';

/** An API failure: HTTP status, the server's error code and its readable sentence. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: Record<string, unknown> | undefined;

  constructor(status: number, code: string, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

type UnauthorizedHandler = () => void;
let onUnauthorized: UnauthorizedHandler | null = null;

/**
 * Registers what happens when a signed-in call answers 401 (the session ended on the server).
 * main.ts wires it to "sign out locally and go to the sign-in page"; the client itself knows no router.
 */
export function setUnauthorizedHandler(handler: UnauthorizedHandler): void {
  onUnauthorized = handler;
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  body?: unknown;
  query?: Record<string, string | number | undefined>;
  /**
   * When true, a 401 is an ordinary answer (a wrong password, "not signed in yet") and must not
   * trigger the global sign-out redirect.
   */
  expectUnauthorized?: boolean;
  signal?: AbortSignal;
}

function buildUrl(path: string, query: RequestOptions['query']): string {
  const url = `${appConfig.apiBaseUrl}${path.startsWith('/') ? path : `/${path}`}`;
  if (!query) return url;
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(query)) {
    if (value !== undefined) params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `${url}?${text}` : url;
}

function isErrorBody(value: unknown): value is { error: { code?: unknown; message?: unknown; details?: unknown } } {
  return typeof value === 'object' && value !== null && 'error' in value && typeof (value as { error: unknown }).error === 'object';
}

/** Parses an answer's text as JSON; undefined when it is empty or not JSON. */
export function parseJsonText(text: string): unknown {
  if (text.length === 0) return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    // A proxy or crashed server may answer with HTML; the caller gets a readable ApiError instead of a parse error.
    return undefined;
  }
}

async function readJson(response: Response): Promise<unknown> {
  return parseJsonText(await response.text());
}

function fallbackMessage(status: number): string {
  if (status === 429) return 'Too many attempts. Please wait a minute and try again.';
  if (status >= 500) return 'The Driftline server had a problem answering. Please try again in a moment.';
  if (status === 404) return 'This item was not found, or you may not see it.';
  if (status === 403) return 'Your role does not allow this.';
  return `The request failed (HTTP ${status}).`;
}

/** Sends one JSON request to the API and returns the parsed body typed as T; throws ApiError on any failure. */
export async function apiRequest<T>(path: string, options: RequestOptions = {}): Promise<T> {
  const method = options.method ?? 'GET';
  let response: Response;
  try {
    response = await fetch(buildUrl(path, options.query), {
      method,
      credentials: 'same-origin',
      headers: { Accept: 'application/json', 'Content-Type': 'application/json' },
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === 'AbortError') throw cause;
    throw new ApiError(0, 'network_error', 'The Driftline server could not be reached. Check your connection and try again.');
  }

  const body = await readJson(response);
  if (response.ok) return body as T;

  if (response.status === 401 && !options.expectUnauthorized) onUnauthorized?.();
  throw errorFromAnswer(response.status, body);
}

/** The ApiError for a failed answer: the server's code and sentence, or one that the status explains. */
export function errorFromAnswer(status: number, body: unknown, fallback: (status: number) => string = fallbackMessage): ApiError {
  const error = isErrorBody(body) ? body.error : undefined;
  const code = typeof error?.code === 'string' ? error.code : `http_${status}`;
  const message = typeof error?.message === 'string' && error.message.length > 0 ? error.message : fallback(status);
  const details = typeof error?.details === 'object' && error.details !== null ? (error.details as Record<string, unknown>) : undefined;
  return new ApiError(status, code, message, details);
}

/** Runs the registered "session ended" handling (for requests sent outside apiRequest, like uploads). */
export function notifyUnauthorized(): void {
  onUnauthorized?.();
}

/** Turns anything thrown into a sentence a person can read. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error && error.message) return error.message;
  return 'Something went wrong. Please try again.';
}
