import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, UpdateDateColumn, type Relation } from 'typeorm';
import type { AreaPart } from '../../shared/remap/area.js';
import type { CoverageEstimate } from '../../shared/remap/coverage.js';
import { MapVersion } from './map-version.entity.js';
import { Site } from './site.entity.js';
import { User } from './user.entity.js';
import { Zone } from './zone.entity.js';

/** proposed → scheduled → in_progress → map_uploaded → verified | not_fixed; or cancelled. */
export type RemapStatus = 'proposed' | 'scheduled' | 'in_progress' | 'map_uploaded' | 'verified' | 'not_fixed' | 'cancelled';
export const REMAP_STATUSES: readonly RemapStatus[] = ['proposed', 'scheduled', 'in_progress', 'map_uploaded', 'verified', 'not_fixed', 'cancelled'];

/** The area to re-drive: its parts (outlines in map metres), total m² and the margin it was grown by. */
export interface RemapAreaFigures {
  parts: AreaPart[];
  areaM2: number;
  marginM: number;
}

/** Agreement (explained / returns, null without returns) and changed area (m²) on one side of a remap. */
export interface RemapSide {
  agreement: number | null;
  changedAreaM2: number;
}

/** What the nightly check found after the new map was activated. */
export interface RemapVerification {
  state: 'waiting' | 'verified' | 'not_fixed';
  evidenceDays: number;
  zonesStillFlagging: number;
  before: RemapSide;
  after: RemapSide | null;
  checkedAt: string | null;
}

/** A request to re-map part of a site, from its zones to the verified new map. */
@Entity({ name: 'remap_requests' })
@Index('IDX_remap_requests_site_number', ['siteId', 'number'], { unique: true })
@Index('IDX_remap_requests_window', ['windowStart'])
export class RemapRequest {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id' })
  site: Relation<Site>;

  /** Short readable reference per site, shown as "R-3". */
  @Column({ type: 'integer' })
  number: number;

  @Column({ type: 'text' })
  title: string;

  @Column({ type: 'text' })
  status: RemapStatus;

  /** 0–1, from the zones' severity and traffic (shared/remap/priority.ts). */
  @Column({ type: 'real', name: 'priority_score' })
  priorityScore: number;

  @Column({ type: 'text', default: '' })
  note: string;

  @Column({ type: 'text', name: 'cancel_reason', nullable: true })
  cancelReason: string | null;

  @Column({ type: 'simple-json' })
  area: RemapAreaFigures;

  @Column({ type: 'simple-json' })
  estimate: CoverageEstimate;

  @Column({ type: 'datetime', name: 'window_start', nullable: true })
  windowStart: Date | null;

  @Column({ type: 'datetime', name: 'window_end', nullable: true })
  windowEnd: Date | null;

  /** The site's IANA time zone when the window was set; local times are shown in it. */
  @Column({ type: 'text', name: 'window_timezone', nullable: true })
  windowTimezone: string | null;

  @Column({ type: 'text', name: 'assignee_id', nullable: true })
  assigneeId: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'assignee_id' })
  assignee: Relation<User> | null;

  @Column({ type: 'text', name: 'requested_by_id', nullable: true })
  requestedById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'requested_by_id' })
  requestedBy: Relation<User> | null;

  @Column({ type: 'text', name: 'approved_by_id', nullable: true })
  approvedById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'approved_by_id' })
  approvedBy: Relation<User> | null;

  @Column({ type: 'datetime', name: 'approved_at', nullable: true })
  approvedAt: Date | null;

  /** The active floor map the zones were found on. */
  @Column({ type: 'text', name: 'map_version_before_id' })
  mapVersionBeforeId: string;

  @ManyToOne(() => MapVersion, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'map_version_before_id' })
  mapVersionBefore: Relation<MapVersion>;

  /** The new map uploaded for the request. */
  @Column({ type: 'text', name: 'map_version_after_id', nullable: true })
  mapVersionAfterId: string | null;

  @ManyToOne(() => MapVersion, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'map_version_after_id' })
  mapVersionAfter: Relation<MapVersion> | null;

  @Column({ type: 'simple-json', nullable: true })
  verification: RemapVerification | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @UpdateDateColumn({ type: 'datetime', name: 'updated_at' })
  updatedAt: Date;
}

/** A zone of a remap request, with the status it had before it joined (it returns to it on cancel). */
@Entity({ name: 'remap_request_zones' })
@Index('IDX_remap_request_zones_zone', ['zoneId'])
export class RemapRequestZone {
  @PrimaryColumn({ type: 'text', name: 'remap_id' })
  remapId: string;

  @ManyToOne(() => RemapRequest, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'remap_id' })
  remap: Relation<RemapRequest>;

  @PrimaryColumn({ type: 'text', name: 'zone_id' })
  zoneId: string;

  @ManyToOne(() => Zone, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'zone_id' })
  zone: Relation<Zone>;

  @Column({ type: 'text', name: 'previous_status' })
  previousStatus: 'open' | 'acknowledged';
}
