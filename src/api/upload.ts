import { appConfig } from '@/config';
import { ApiError, errorFromAnswer, notifyUnauthorized, parseJsonText } from './client';

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

function uploadFallback(status: number): string {
  // Without a JSON answer (a proxy's size limit, a crashed server) the status alone has to explain.
  if (status === 413) return 'The file is larger than the server accepts.';
  if (status >= 500) return 'The Driftline server had a problem with this upload. Please try again in a moment.';
  return `The upload failed (HTTP ${status}).`;
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
      const body = parseJsonText(xhr.responseText);
      if (xhr.status >= 200 && xhr.status < 300) {
        resolve(body as T);
        return;
      }
      // The session ended during the upload: sign out as every other call does.
      if (xhr.status === 401) notifyUnauthorized();
      reject(errorFromAnswer(xhr.status, body, uploadFallback));
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
