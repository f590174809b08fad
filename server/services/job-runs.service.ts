import { DateTime } from 'luxon';
import type { Logger } from 'pino';
import { LessThan, type DataSource } from 'typeorm';
import { AgreementBlocks, EvidenceChunk, HourlyTraffic, JobRun, MapVersion, PoseTrail, ScanSample, Site } from '../entities/index.js';
import type { JobName } from '../entities/job-run.entity.js';
import { notFound } from '../http-error.js';
import type { BackupService } from './backup.service.js';
import type { DetectionService } from './detection.service.js';
import { newId } from './ids.js';
import type { RemapsService } from './remaps.service.js';
import type { ReportsService } from './reports.service.js';
import { completeDays } from './site-days.js';
import { siteSettings } from './site-settings.js';

type Trigger = JobRun['trigger'];

function runView(r: JobRun & { siteName?: string | null }) {
  return {
    id: r.id,
    job: r.job,
    siteId: r.siteId,
    siteName: r.siteName ?? null,
    trigger: r.trigger,
    status: r.status,
    startedAt: r.startedAt.toISOString(),
    finishedAt: r.finishedAt?.toISOString() ?? null,
    durationMs: r.finishedAt ? r.finishedAt.getTime() - r.startedAt.getTime() : null,
    error: r.error,
    figures: r.figures,
  };
}

/**
 * Runs the scheduled jobs' work with a JobRun record each (start, end, status, figures, error).
 * A failing site is recorded and the others go on; nothing here throws to the scheduler.
 */
export class JobRunsService {
  // Per (job, site): a run already under way is not started twice (no overlapping runs).
  private readonly running = new Set<string>();

  constructor(
    private readonly db: DataSource,
    private readonly detection: DetectionService,
    private readonly log: Logger,
    private readonly remaps: RemapsService,
  ) {}

  private async record(job: JobName, site: Site | null, trigger: Trigger, work: () => Promise<Record<string, unknown>>) {
    const key = `${job}|${site?.id ?? '*'}`;
    if (this.running.has(key)) return null;
    this.running.add(key);
    const run = this.db.getRepository(JobRun).create({ id: newId(), job, siteId: site?.id ?? null, trigger, startedAt: new Date(), status: 'running', error: null, figures: null, finishedAt: null });
    await this.db.getRepository(JobRun).save(run);
    try {
      run.figures = await work();
      run.status = 'succeeded';
      run.finishedAt = new Date();
      await this.db.getRepository(JobRun).save(run);
    } catch (err) {
      this.log.error({ err, job, site: site?.name }, 'job run failed');
      Object.assign(run, { status: 'failed', finishedAt: new Date(), error: err instanceof Error ? err.message : String(err) });
      await this.db.getRepository(JobRun).save(run);
    } finally {
      this.running.delete(key);
    }
    return this.db.getRepository(JobRun).findOneByOrFail({ id: run.id });
  }

  /** Nightly detection of one site (or every site), each recorded as its own run; once zones are tracked, the site's remaps with a new active map are verified. */
  async detect(trigger: Trigger, siteId?: string, now = new Date()) {
    const sites = siteId ? [await this.site(siteId)] : await this.db.getRepository(Site).find({ order: { name: 'ASC' } });
    const runs = [];
    for (const site of sites) {
      const run = await this.record('detection', site, trigger, async () => {
        const figures = await this.detection.runForSite(site, now);
        return { ...figures, remaps: await this.remaps.verify(site, now) };
      });
      if (run) runs.push(run);
    }
    return runs;
  }

  /** The monthly reports that are due (ReportsService.due), sent as one 'report' run; null when none is due, so the hourly check leaves no empty runs. */
  async report(trigger: Trigger, reports: Pick<ReportsService, 'due' | 'sendDue'>, now = new Date()) {
    if ((await reports.due(now)).length === 0) return null;
    return this.record('report', null, trigger, async () => ({ reports: await reports.sendDue(now) }));
  }

  /** An online backup of the database into the data directory with rotation (BackupService.create), as one 'backup' run. */
  async backup(trigger: Trigger, backups: Pick<BackupService, 'create'>, now = new Date()) {
    return this.record('backup', null, trigger, async () => ({ ...(await backups.create(now)) }));
  }

  /** Evidence retention: drops evidence, agreement blocks, scan samples, robot trails and hourly traffic older than each site's retention days. */
  async retention(trigger: Trigger, now = new Date()) {
    return this.record('retention', null, trigger, async () => {
      let chunks = 0;
      let blocks = 0;
      let samples = 0;
      let trails = 0;
      let hours = 0;
      for (const site of await this.db.getRepository(Site).find()) {
        const [cutoff] = completeDays(site.timezone, now, siteSettings(site).retentionDays);
        const cutoffMs = DateTime.fromISO(cutoff, { zone: site.timezone }).toMillis();
        hours += (await this.db.getRepository(HourlyTraffic).delete({ siteId: site.id, hourStartMs: LessThan(cutoffMs) })).affected ?? 0;
        const versions = (await this.db.getRepository(MapVersion).find({ where: { siteId: site.id }, select: { id: true } })).map((v) => v.id);
        for (const mapVersionId of versions) {
          chunks += (await this.db.getRepository(EvidenceChunk).delete({ mapVersionId, day: LessThan(cutoff) })).affected ?? 0;
          blocks += (await this.db.getRepository(AgreementBlocks).delete({ mapVersionId, day: LessThan(cutoff) })).affected ?? 0;
          samples += (await this.db.getRepository(ScanSample).delete({ mapVersionId, day: LessThan(cutoff) })).affected ?? 0;
          trails += (await this.db.getRepository(PoseTrail).delete({ mapVersionId, day: LessThan(cutoff) })).affected ?? 0;
        }
      }
      return { chunksDeleted: chunks, blocksDeleted: blocks, samplesDeleted: samples, trailsDeleted: trails, hoursDeleted: hours };
    });
  }

  private async site(siteId: string) {
    const site = await this.db.getRepository(Site).findOneBy({ id: siteId });
    if (!site) throw notFound('The site');
    return site;
  }

  /** Recent runs, newest first, with site names; optionally of one job. */
  async list(limit: number, job?: JobName) {
    const runs = await this.db.getRepository(JobRun).find({ where: job ? { job } : {}, order: { startedAt: 'DESC' }, take: limit });
    const names = new Map((await this.db.getRepository(Site).find({ select: { id: true, name: true } })).map((s) => [s.id, s.name]));
    return runs.map((r) => runView({ ...r, siteName: r.siteId ? (names.get(r.siteId) ?? null) : null }));
  }

  /** Marks runs left 'running' by a stopped process as failed. */
  async failInterrupted() {
    await this.db.getRepository(JobRun).update({ status: 'running' }, { status: 'failed', finishedAt: new Date(), error: 'The server stopped during this run.' });
  }
}
