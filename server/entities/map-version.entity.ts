import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import type { MapKind } from '../../shared/grid/map-kinds.js';
import type { MapMode } from '../../shared/types/grid.js';
import { Site } from './site.entity.js';
import { User } from './user.entity.js';

export type { MapKind };
export type MapStatus = 'draft' | 'active' | 'archived';

/** One uploaded grid map of a site: a floor map, or a docking-station model at fine resolution. */
@Entity({ name: 'map_versions' })
@Index(['siteId', 'kind', 'version'], { unique: true })
export class MapVersion {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id' })
  site: Relation<Site>;

  /** 1, 2, 3 … per site and kind. */
  @Column({ type: 'integer' })
  version: number;

  @Column({ type: 'text' })
  kind: MapKind;

  /** Free text: what changed, or which station this model is. */
  @Column({ type: 'text', default: '' })
  label: string;

  /** Metres per cell. */
  @Column({ type: 'real' })
  resolution: number;

  @Column({ type: 'real', name: 'origin_x' })
  originX: number;

  @Column({ type: 'real', name: 'origin_y' })
  originY: number;

  /** Radians. */
  @Column({ type: 'real', name: 'origin_yaw' })
  originYaw: number;

  @Column({ type: 'integer' })
  width: number;

  @Column({ type: 'integer' })
  height: number;

  /** Deflated bytes: width·height cell states, then width·height probabilities (0–255). */
  @Column({ type: 'blob', select: false })
  grid: Buffer;

  @Column({ type: 'integer', name: 'occupied_cells' })
  occupiedCells: number;

  @Column({ type: 'integer', name: 'free_cells' })
  freeCells: number;

  @Column({ type: 'integer', name: 'unknown_cells' })
  unknownCells: number;

  /** How the image was read: negate, thresholds, mode. */
  @Column({ type: 'simple-json' })
  interpretation: { negate: 0 | 1; occupiedThresh: number; freeThresh: number; mode: MapMode };

  @Column({ type: 'text', name: 'source_file_name' })
  sourceFileName: string;

  /** SHA-256 of the uploaded image file. */
  @Column({ type: 'text', name: 'source_checksum' })
  sourceChecksum: string;

  @Column({ type: 'text', default: 'draft' })
  status: MapStatus;

  @Column({ type: 'text', name: 'uploaded_by_id', nullable: true })
  uploadedById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'uploaded_by_id' })
  uploadedBy: Relation<User> | null;

  @CreateDateColumn({ type: 'datetime', name: 'uploaded_at' })
  uploadedAt: Date;

  @Column({ type: 'datetime', name: 'activated_at', nullable: true })
  activatedAt: Date | null;

  @Column({ type: 'text', name: 'activated_by_id', nullable: true })
  activatedById: string | null;
}
