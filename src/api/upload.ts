import { appConfig } from '@/config';
import { ApiError, apiRequest } from './client';

/** How far an upload has gone: bytes sent so far and the request's total bytes (null while the browser cannot tell). */
export interface UploadProgress {
  loaded: number;
  total: number | null;
}

export interface UploadOptions {
  /** Called as the browser sends the body; fetch cannot report this, hence XMLHttpRequest. */
  onProgress?: (progress: UploadProgress) => void;
  signal?: AbortSignal;
}

function parseBody(text: string): unknown {
  if (text.length === 0) return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

function uploadError(status: number, body: unknown): ApiError {
  const error = (body as { error?: { code?: unknown; message?: unknown; details?: unknown } } | undefined)?.error;
  const code = typeof error?.code === 'string' ? error.code : `http_${status}`;
  const details = typeof error?.details === 'object' && error.details !== null ? (error.details as Record<string, unknown>) : undefined;
  if (typeof error?.message === 'string' && error.message.length > 0) return new ApiError(status, code, error.message, details);
  // Without a JSON answer (a proxy's size limit, a crashed server) the status alone has to explain.
  if (status === 413) return new ApiError(status, code, 'The file is larger than the server accepts.');
  if (status >= 500) return new ApiError(status, code, 'The Driftline server had a problem with this upload. Please try again in a moment.');
  return new ApiError(status, code, `The upload failed (HTTP ${status}).`);
}

/**
 * POSTs a multipart form to the API, reporting upload progress, and returns the parsed JSON
 * answer typed as T; throws ApiError with the server's sentence on any failure, like apiRequest.
 */
export function postForm<T>(path: string, form: FormData, options: UploadOptions = {}): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${appConfig.apiBaseUrl}${path}`);
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.upload.onprogress = (event) => options.onProgress?.({ loaded: event.loaded, total: event.lengthComputable ? event.total : null });
    xhr.onload = () => {
      const body = parseBody(xhr.responseText);
      if (xhr.status >= 200 && xhr.status < 300) {
        resolve(body as T);
        return;
      }
      if (xhr.status === 401) {
        // The session ended during the upload; one ordinary call lets the API client's own 401 handling sign out.
        void apiRequest('/auth/me').catch(() => undefined);
      }
      reject(uploadError(xhr.status, body));
    };
    xhr.onerror = () => reject(new ApiError(0, 'network_error', 'The upload was interrupted: the Driftline server could not be reached. Check your connection and try again.'));
    xhr.onabort = () => reject(new DOMException('The upload was cancelled.', 'AbortError'));
    if (options.signal) {
      if (options.signal.aborted) {
        reject(new DOMException('The upload was cancelled.', 'AbortError'));
        return;
      }
      options.signal.addEventListener('abort', () => xhr.abort(), { once: true });
    }
    xhr.send(form);
  });
}
