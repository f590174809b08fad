import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** The thinned base poses of one robot from one batch and site-local day (the map's paths layer). */
@Entity({ name: 'pose_trails' })
@Index(['mapVersionId', 'lastMs'])
export class PoseTrail {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @Column({ type: 'text', name: 'robot_id' })
  robotId: string;

  /** Site-local day of the poses, for retention. */
  @Column({ type: 'text' })
  day: string;

  /** Time of the first and last pose, ms since the epoch. */
  @Column({ type: 'integer', name: 'first_ms' })
  firstMs: number;

  @Column({ type: 'integer', name: 'last_ms' })
  lastMs: number;

  @Column({ type: 'integer' })
  count: number;

  /** Deflated poses as shared/scan/trail.ts packs them. */
  @Column({ type: 'blob' })
  data: Buffer;
}
