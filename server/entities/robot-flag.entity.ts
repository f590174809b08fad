import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Robot } from './robot.entity.js';
import { User } from './user.entity.js';

/** Figures behind a scanner flag: the robot's agreement against its fleet's on the same days. */
export interface FlagFigures {
  days: { day: string; agreement: number; fleetMedian: number; z: number }[];
  meanAgreement: number;
  fleetMedian: number;
  medianZ: number;
}

/** Estimated mount error: metres and radians, with one standard deviation each. */
export interface MountFigures {
  dx: number;
  dy: number;
  dyaw: number;
  sigma: { dx: number; dy: number; dyaw: number };
  inliers: number;
  converged: boolean;
}

/** "Scanner check advised" on one robot's scanner, until someone clears it. */
@Entity({ name: 'robot_flags' })
@Index(['robotId', 'status'])
export class RobotFlag {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'robot_id' })
  robotId: string;

  @ManyToOne(() => Robot, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'robot_id' })
  robot: Relation<Robot>;

  @Column({ type: 'text' })
  scanner: string;

  @Column({ type: 'text' })
  status: 'active' | 'cleared';

  @Column({ type: 'datetime', name: 'raised_at' })
  raisedAt: Date;

  @Column({ type: 'simple-json' })
  figures: FlagFigures;

  @Column({ type: 'simple-json', nullable: true })
  mount: MountFigures | null;

  @Column({ type: 'datetime', name: 'cleared_at', nullable: true })
  clearedAt: Date | null;

  @Column({ type: 'text', name: 'cleared_by_id', nullable: true })
  clearedById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'cleared_by_id' })
  clearedBy: Relation<User> | null;

  @Column({ type: 'text', nullable: true })
  note: string | null;
}
