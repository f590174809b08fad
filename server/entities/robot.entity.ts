import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Site } from './site.entity.js';

/** A scanner's pose in the robot's base frame: metres and radians. */
export interface ScannerMount {
  name: string;
  x: number;
  y: number;
  yaw: number;
}

@Entity({ name: 'robots' })
@Index(['siteId', 'name'], { unique: true })
export class Robot {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'site_id' })
  siteId: string;

  @ManyToOne(() => Site, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'site_id' })
  site: Relation<Site>;

  /** The name the robot writes in its scan logs, e.g. "AMR-07". */
  @Column({ type: 'text' })
  name: string;

  @Column({ type: 'text' })
  model: string;

  @Column({ type: 'simple-json' })
  mounts: ScannerMount[];

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;
}
