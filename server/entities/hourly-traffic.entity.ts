import { Column, Entity, PrimaryColumn } from 'typeorm';

/** Scans and returns a site's robots sent in one UTC hour (all map versions): the quiet-window planner reads it. */
@Entity({ name: 'hourly_traffic' })
export class HourlyTraffic {
  @PrimaryColumn({ type: 'text', name: 'site_id' })
  siteId: string;

  /** Start of the UTC hour, ms since the epoch. */
  @PrimaryColumn({ type: 'integer', name: 'hour_start_ms' })
  hourStartMs: number;

  @Column({ type: 'integer' })
  scans: number;

  @Column({ type: 'integer' })
  returns: number;
}
