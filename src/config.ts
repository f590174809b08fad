/**
 * The app's settings, read once at start. Vite inlines `import.meta.env` at build time, so this
 * is the only module that looks at it; everything else imports `appConfig`.
 */
export interface AppConfig {
  /** Prefix of every API path, without a trailing slash (e.g. "/api"). */
  apiBaseUrl: string;
  /** Shortest password the server accepts, in characters (the server enforces it again). */
  passwordMinLength: number;
  /** Longest password the server accepts, in characters. */
  passwordMaxLength: number;
}

function readApiBaseUrl(): string {
  const raw = (import.meta.env.VITE_DRIFTLINE_API_BASE as string | undefined)?.trim();
  // The SPA is served by the API server itself (or proxied by Vite in dev), so same-origin "/api" is the default.
  const base = raw && raw.length > 0 ? raw : '/api';
  return base.endsWith('/') ? base.slice(0, -1) : base;
}

/** The app's configuration, frozen so that nobody changes it at run time. */
export const appConfig: Readonly<AppConfig> = Object.freeze({
  apiBaseUrl: readApiBaseUrl(),
  passwordMinLength: 12,
  passwordMaxLength: 128,
});
