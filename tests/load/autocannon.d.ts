// autocannon@9.0.0 ships no type declarations: the part of its API the load test uses.
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  export interface AutocannonRequest {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string | Buffer;
    /** Called before each request is sent; returns the request to send. */
    setupRequest?: (request: AutocannonRequest, context: Record<string, unknown>) => AutocannonRequest;
    /** Called with each answer (status, body text). */
    onResponse?: (status: number, body: string, context: Record<string, unknown>) => void;
  }

  export interface AutocannonOptions {
    url: string;
    connections?: number;
    /** Seconds. */
    duration?: number;
    /** Seconds before a request counts as timed out. */
    timeout?: number;
    /** Requests per second per connection (open loop); unset means as fast as answers come. */
    connectionRate?: number;
    /** Requests per second over all connections (open loop). */
    overallRate?: number;
    requests?: AutocannonRequest[];
    headers?: Record<string, string>;
  }

  export interface AutocannonResult {
    errors: number;
    timeouts: number;
    non2xx: number;
    /** Seconds. */
    duration: number;
    requests: { total: number; average: number };
  }

  export interface Instance extends EventEmitter {
    stop(): void;
    on(event: 'response', listener: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): this;
    on(event: 'reqError', listener: (error: Error) => void): this;
    on(event: 'done', listener: (result: AutocannonResult) => void): this;
  }

  function autocannon(options: AutocannonOptions, callback: (error: Error | null, result: AutocannonResult) => void): Instance;
  export default autocannon;
}
