import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

export type JobName = 'detection' | 'retention' | 'report' | 'backup';

/** One run of a scheduled or manually started job. */
@Entity({ name: 'job_runs' })
@Index(['job', 'startedAt'])
export class JobRun {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text' })
  job: JobName;

  /** The site a per-site job ran for. */
  @Column({ type: 'text', name: 'site_id', nullable: true })
  siteId: string | null;

  @Column({ type: 'text' })
  trigger: 'schedule' | 'manual' | 'startup';

  @Column({ type: 'datetime', name: 'started_at' })
  startedAt: Date;

  @Column({ type: 'datetime', name: 'finished_at', nullable: true })
  finishedAt: Date | null;

  @Column({ type: 'text' })
  status: 'running' | 'succeeded' | 'failed';

  @Column({ type: 'text', nullable: true })
  error: string | null;

  @Column({ type: 'simple-json', nullable: true })
  figures: Record<string, unknown> | null;
}
