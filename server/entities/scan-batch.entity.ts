import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { MapVersion } from './map-version.entity.js';
import { Site } from './site.entity.js';

export type BatchSource = 'robot' | 'upload';
/** processing: an uploaded log being read; counted: in the evidence; duplicate, rejected, failed: nothing counted. */
export type BatchStatus = 'processing' | 'counted' | 'duplicate' | 'rejected' | 'failed';

/** One refused line of a batch. */
export interface RejectedLine {
  line: number;
  reason: string;
}

/** One received batch of scans (a robot's POST or an uploaded log) with its figures. */
@Entity({ name: 'scan_batches' })
@Index(['siteId', 'idempotencyKey'], { unique: true, where: 'idempotency_key IS NOT NULL' })
@Index(['siteId', 'contentHash'], { unique: true, where: "status = 'counted'" })
export class ScanBatch {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Index()
  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id' })
  site: Relation<Site>;

  /** The robot whose token sent it; null for uploaded logs, which may hold several robots. */
  @Column({ type: 'text', name: 'robot_id', nullable: true })
  robotId: string | null;

  @Column({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @ManyToOne(() => MapVersion, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'map_version_id' })
  mapVersion: Relation<MapVersion>;

  @Column({ type: 'text' })
  source: BatchSource;

  @Column({ type: 'text', name: 'file_name', nullable: true })
  fileName: string | null;

  @Column({ type: 'text', name: 'idempotency_key', nullable: true })
  idempotencyKey: string | null;

  /** SHA-256 of the batch's uncompressed bytes. */
  @Column({ type: 'text', name: 'content_hash', nullable: true })
  contentHash: string | null;

  @Column({ type: 'text' })
  status: BatchStatus;

  @Column({ type: 'datetime', name: 'received_at' })
  receivedAt: Date;

  @Column({ type: 'datetime', name: 'finished_at', nullable: true })
  finishedAt: Date | null;

  /** Bytes read so far and in all (uploads), for progress. */
  @Column({ type: 'integer', name: 'bytes_read', default: 0 })
  bytesRead: number;

  @Column({ type: 'integer', name: 'bytes_total', nullable: true })
  bytesTotal: number | null;

  @Column({ type: 'integer', default: 0 })
  lines: number;

  @Column({ type: 'integer', default: 0 })
  scans: number;

  /** Pose reports received (lines with a pose and no beams; they only feed the paths layer). */
  @Column({ type: 'integer', default: 0 })
  poses: number;

  @Column({ type: 'integer', default: 0 })
  beams: number;

  @Column({ type: 'integer', default: 0 })
  returns: number;

  @Column({ type: 'integer', default: 0 })
  explained: number;

  @Column({ type: 'integer', name: 'out_of_map', default: 0 })
  outOfMap: number;

  @Column({ type: 'integer', name: 'rejected_count', default: 0 })
  rejectedCount: number;

  /** The first refused lines with reasons (at most 200 kept). */
  @Column({ type: 'simple-json', name: 'rejected_lines' })
  rejectedLines: RejectedLine[];

  /** Site-local days the batch added evidence to. */
  @Column({ type: 'simple-json' })
  days: string[];

  @Column({ type: 'text', nullable: true })
  error: string | null;
}
