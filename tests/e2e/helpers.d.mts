// Types of the part of the browser tests' helpers that TypeScript callers use (the load test).

/** Anything that answers GET like playwright's request context: `ok()`, `status()` and `json()`. */
export interface JsonGetter {
  get(url: string): Promise<{ ok(): boolean; status(): number; json(): Promise<unknown> }>;
}

/** Waits until the demo is seeded and every site has a succeeded detection run; returns the sites. */
export function waitForDetection(api: JsonGetter, baseUrl: string): Promise<Array<{ id: string; name: string; timezone: string }>>;
