import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/** Per site, robot, scanner and site-local day: what the scans held. */
@Entity({ name: 'daily_stats' })
@Index(['siteId', 'day'])
export class DailyStat {
  @PrimaryColumn({ type: 'text', name: 'site_id' })
  siteId: string;

  @PrimaryColumn({ type: 'text', name: 'robot_id' })
  robotId: string;

  @PrimaryColumn({ type: 'text' })
  scanner: string;

  @PrimaryColumn({ type: 'text' })
  day: string;

  @PrimaryColumn({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @Column({ type: 'integer', default: 0 })
  scans: number;

  @Column({ type: 'integer', default: 0 })
  beams: number;

  @Column({ type: 'integer', default: 0 })
  returns: number;

  /** Returns within the tolerance of mapped structure (DESIGN.md §4.3). */
  @Column({ type: 'integer', default: 0 })
  explained: number;

  @Column({ type: 'integer', name: 'out_of_map', default: 0 })
  outOfMap: number;
}
