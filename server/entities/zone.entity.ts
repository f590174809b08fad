import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, UpdateDateColumn, type Relation } from 'typeorm';
import { MapVersion } from './map-version.entity.js';
import { Site } from './site.entity.js';

export type ZoneKind = 'new' | 'missing' | 'unmapped';
/** open → acknowledged → planned → resolved; or dismissed (with a reason); cleared when no longer seen. */
export type ZoneStatus = 'open' | 'acknowledged' | 'planned' | 'resolved' | 'dismissed' | 'cleared';
export const ACTIVE_ZONE_STATUSES: ZoneStatus[] = ['open', 'acknowledged', 'planned'];

/** A changed area of a site's map, tracked across detection runs. */
@Entity({ name: 'zones' })
@Index(['siteId', 'status'])
export class Zone {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id' })
  site: Relation<Site>;

  @Column({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @ManyToOne(() => MapVersion, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'map_version_id' })
  mapVersion: Relation<MapVersion>;

  /** Short readable reference shown to people, e.g. "Z-14". */
  @Column({ type: 'integer' })
  number: number;

  @Column({ type: 'text' })
  kind: ZoneKind;

  @Column({ type: 'text' })
  status: ZoneStatus;

  @Column({ type: 'text' })
  persistence: 'persistent' | 'intermittent';

  /** Outline polygon in map metres. */
  @Column({ type: 'simple-json' })
  outline: [number, number][];

  /** [xmin, ymin, xmax, ymax] in metres. */
  @Column({ type: 'simple-json' })
  bbox: [number, number, number, number];

  @Column({ type: 'simple-json' })
  centroid: [number, number];

  @Column({ type: 'integer', name: 'cell_count' })
  cellCount: number;

  @Column({ type: 'real', name: 'area_m2' })
  areaM2: number;

  @Column({ type: 'real', name: 'mean_hit_rate' })
  meanHitRate: number;

  @Column({ type: 'real', name: 'hit_rate_low' })
  hitRateLow: number;

  @Column({ type: 'real', name: 'hit_rate_high' })
  hitRateHigh: number;

  @Column({ type: 'integer' })
  observations: number;

  @Column({ type: 'integer', name: 'days_observed' })
  daysObserved: number;

  @Column({ type: 'integer', name: 'days_flagged' })
  daysFlagged: number;

  @Column({ type: 'real', name: 'traffic_per_m2_day' })
  trafficPerM2PerDay: number;

  /** 0–1; see the detection module for the formula. */
  @Column({ type: 'real' })
  severity: number;

  /** Per day of the last run's window: observations, hit rate, flagged. */
  @Column({ type: 'simple-json' })
  timeline: { day: string; observations: number; hitRate: number | null; flagged: boolean }[];

  /** Deflated Int32 cell indices (j·width + i) of the last run, for matching runs by overlap. */
  @Column({ type: 'blob', select: false })
  cells: Buffer;

  /** Site-local days. */
  @Column({ type: 'text', name: 'first_seen_day' })
  firstSeenDay: string;

  @Column({ type: 'text', name: 'last_seen_day' })
  lastSeenDay: string;

  /** Consecutive detection runs that did not see the zone. */
  @Column({ type: 'integer', name: 'missed_runs', default: 0 })
  missedRuns: number;

  @Column({ type: 'text', name: 'status_note', nullable: true })
  statusNote: string | null;

  @Column({ type: 'datetime', name: 'status_changed_at', nullable: true })
  statusChangedAt: Date | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @UpdateDateColumn({ type: 'datetime', name: 'updated_at' })
  updatedAt: Date;
}
