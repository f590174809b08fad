import { Column, Entity, PrimaryColumn } from 'typeorm';

/** A few raw scans per robot, scanner and day, kept for estimating scanner mount errors. */
@Entity({ name: 'scan_samples' })
export class ScanSample {
  @PrimaryColumn({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @PrimaryColumn({ type: 'text', name: 'robot_id' })
  robotId: string;

  @PrimaryColumn({ type: 'text' })
  scanner: string;

  @PrimaryColumn({ type: 'text' })
  day: string;

  @Column({ type: 'integer' })
  count: number;

  /** Deflated JSON Lines of the sampled scans, as received. */
  @Column({ type: 'blob' })
  data: Buffer;
}
