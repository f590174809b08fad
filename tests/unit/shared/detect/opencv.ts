import { createRequire } from 'node:module';

/**
 * Loads @techstark/opencv-js@4.5.2 (a reference for tests only) and resolves once its WebAssembly
 * runtime is ready. Node's own require is used on purpose: importing the 10 MB script through
 * vitest's module runner spins for minutes, while Node loads it in well under a second.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export async function loadOpenCv(): Promise<any> {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const cv: any = createRequire(import.meta.url)('@techstark/opencv-js');
  // The runtime compiles asynchronously after require returns and then calls this hook.
  await new Promise<void>((resolve) => {
    cv.onRuntimeInitialized = () => resolve();
  });
  return cv;
}
