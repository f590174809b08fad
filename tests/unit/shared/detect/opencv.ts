import { createRequire } from 'node:module';

/**
 * Loads @techstark/opencv-js@4.5.2 (a reference for tests only) and resolves once its WebAssembly
 * runtime is ready, as `{ cv }`. Two traps: until the runtime is ready the module object has a
 * `then` method, so returning it bare from an async function (or letting an ESM loader await it)
 * makes the promise adopt it and never settle, hence the wrapper object; and it is loaded with
 * Node's own require rather than through vitest's module runner for the same reason.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function loadOpenCv(): Promise<{ cv: any }> {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const cv: any = createRequire(import.meta.url)('@techstark/opencv-js');
  // The runtime compiles asynchronously after require returns and then calls this hook.
  await new Promise<void>((resolve) => {
    cv.onRuntimeInitialized = () => resolve();
  });
  return { cv };
}
