import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import type { RejectedLine } from './scan-batch.entity.js';
import { Site } from './site.entity.js';

/** One counted batch of docking results from a robot: the receipt, and the key and hash that make a replay count nothing. */
@Entity({ name: 'docking_batches' })
@Index('IDX_docking_batches_site_key', ['siteId', 'idempotencyKey'], { unique: true, where: 'idempotency_key IS NOT NULL' })
@Index('IDX_docking_batches_site_hash', ['siteId', 'contentHash'], { unique: true })
export class DockingBatch {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id', foreignKeyConstraintName: 'FK_docking_batches_site' })
  site: Relation<Site>;

  /** The robot whose token sent it (kept when the robot is removed later). */
  @Column({ type: 'text', name: 'robot_id' })
  robotId: string;

  @Column({ type: 'text', name: 'idempotency_key', nullable: true })
  idempotencyKey: string | null;

  /** SHA-256 of the batch's uncompressed bytes. */
  @Column({ type: 'text', name: 'content_hash' })
  contentHash: string;

  @Column({ type: 'datetime', name: 'received_at' })
  receivedAt: Date;

  /** Non-empty lines, lines counted, lines refused. */
  @Column({ type: 'integer' })
  lines: number;

  @Column({ type: 'integer' })
  counted: number;

  @Column({ type: 'integer', name: 'rejected_count' })
  rejectedCount: number;

  /** The first refused lines with their reasons. */
  @Column({ type: 'simple-json', name: 'rejected_lines' })
  rejectedLines: RejectedLine[];
}
