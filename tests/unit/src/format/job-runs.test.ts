import { describe, expect, it } from 'vitest';
import type { JobRun } from '../../../../src/api/job-runs.api.js';
import { bytes, runFigures } from '../../../../src/format/job-runs.js';

const run = (job: JobRun['job'], figures: JobRun['figures'], status: JobRun['status'] = 'succeeded'): JobRun => ({
  id: 'r1',
  job,
  siteId: null,
  siteName: null,
  trigger: 'manual',
  status,
  startedAt: '2026-12-02T02:45:00.000Z',
  finishedAt: '2026-12-02T02:45:03.000Z',
  durationMs: 3000,
  error: null,
  figures,
});

describe('job run summaries', () => {
  it('when a byte count is shown, then it uses powers of 1024 with one decimal', () => {
    expect(bytes(850)).toBe('850 B');
    expect(bytes(1536)).toBe('1.5 KB');
    expect(bytes(12.3 * 1024 * 1024)).toBe('12.3 MB');
    expect(bytes(5 * 1024 ** 3)).toBe('5.0 GB');
  });

  it('when a backup run is summed up, then the sentence names the file, its size and the rotation', () => {
    const figures = { file: 'driftline-20261202T024500Z.sqlite', bytes: 3 * 1024 * 1024, pages: 768, durationMs: 420, integrity: 'ok' as const, keep: 7, kept: ['a', 'b', 'c'], removed: ['old'] };
    expect(runFigures(run('backup', figures))).toBe('saved driftline-20261202T024500Z.sqlite (3.0 MB, integrity check ok); 3 backups kept of 7, removed 1 older backup');
    expect(runFigures(run('backup', { ...figures, kept: ['a'], removed: [] }))).toBe('saved driftline-20261202T024500Z.sqlite (3.0 MB, integrity check ok); 1 backup kept of 7');
  });

  it('when a report run is summed up, then each organization’s month and queued mails are listed', () => {
    expect(runFigures(run('report', { reports: [{ organization: 'Ambergate Provisions', month: '2026-11', queued: 2 }, { organization: 'Corvane Parts & Supply', month: '2026-11', queued: 1 }] }))).toBe(
      'Ambergate Provisions 2026-11: 2 mails queued; Corvane Parts & Supply 2026-11: 1 mail queued',
    );
    expect(runFigures(run('report', { reports: [] }))).toBe('no report was due');
    expect(runFigures(run('backup', null, 'failed'))).toBe('no figures (the run failed)');
  });
});
