import { apiRequest } from './client';
import { postForm, type UploadOptions } from './upload';

export type BatchStatus = 'processing' | 'counted' | 'duplicate' | 'rejected' | 'failed';
export type BatchSource = 'robot' | 'upload';

/** A refused line of a batch: its 1-based line number and the reason in words. */
export interface RejectedLine {
  line: number;
  reason: string;
}

/** One batch of scans (a robot's post or an uploaded log) and what counting it gave; sizes in bytes, days as site-local dates. */
export interface ScanBatch {
  id: string;
  siteId: string;
  robotId: string | null;
  mapVersionId: string;
  source: BatchSource;
  fileName: string | null;
  idempotencyKey: string | null;
  status: BatchStatus;
  receivedAt: string;
  finishedAt: string | null;
  /** Share of the file read so far, 0..1. */
  progress: number;
  bytesRead: number;
  bytesTotal: number | null;
  lines: number;
  scans: number;
  beams: number;
  returns: number;
  outOfMap: number;
  rejectedCount: number;
  /** The first refused lines (the server keeps at most 200). */
  rejectedLines: RejectedLine[];
  days: string[];
  error: string | null;
}

const batchesPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/scan-batches`;

/** Returns a site's most recent batches, newest first (at most `limit`, 1–200). */
export async function listScanBatches(siteId: string, limit = 50): Promise<ScanBatch[]> {
  return (await apiRequest<{ batches: ScanBatch[] }>(batchesPath(siteId), { query: { limit } })).batches;
}

/** Returns one batch, with its progress while the server is still reading it. */
export async function getScanBatch(siteId: string, batchId: string): Promise<ScanBatch> {
  return (await apiRequest<{ batch: ScanBatch }>(`${batchesPath(siteId)}/${encodeURIComponent(batchId)}`)).batch;
}

/** Uploads a recorded scan log (.jsonl or .jsonl.gz); the server answers at once with a batch in status 'processing'. */
export async function uploadScanLog(siteId: string, log: File, options: UploadOptions = {}): Promise<ScanBatch> {
  const body = new FormData();
  body.set('log', log, log.name);
  return (await postForm<{ batch: ScanBatch }>(batchesPath(siteId), body, options)).batch;
}
