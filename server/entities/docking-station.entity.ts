import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { MapVersion } from './map-version.entity.js';
import { Site } from './site.entity.js';
import { User } from './user.entity.js';

/** A named docking (charging) station of a site, with its current station model and tolerance override. */
@Entity({ name: 'docking_stations' })
@Index('IDX_docking_stations_site_name', ['siteId', 'name'], { unique: true })
export class DockingStation {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id', foreignKeyConstraintName: 'FK_docking_stations_site' })
  site: Relation<Site>;

  /** The name robots write in their docking results, unique per site. */
  @Column({ type: 'text' })
  name: string;

  /** Radial position tolerance of this station, millimetres; null takes the site setting. */
  @Column({ type: 'real', name: 'tolerance_mm', nullable: true })
  toleranceMm: number | null;

  /** Heading tolerance of this station, degrees; null takes the site setting. */
  @Column({ type: 'real', name: 'tolerance_deg', nullable: true })
  toleranceDeg: number | null;

  /** The current station model: a map version of kind 'station' of the same site. */
  @Column({ type: 'text', name: 'model_version_id', nullable: true })
  modelVersionId: string | null;

  @ManyToOne(() => MapVersion, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'model_version_id', foreignKeyConstraintName: 'FK_docking_stations_model' })
  modelVersion: Relation<MapVersion> | null;

  @Column({ type: 'datetime', name: 'model_attached_at', nullable: true })
  modelAttachedAt: Date | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'text', name: 'created_by_id', nullable: true })
  createdById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'created_by_id', foreignKeyConstraintName: 'FK_docking_stations_created_by' })
  createdBy: Relation<User> | null;
}
