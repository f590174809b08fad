import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Robot } from './robot.entity.js';
import { User } from './user.entity.js';

/** A robot's bearer token for the ingest API; only its SHA-256 is stored. */
@Entity({ name: 'robot_tokens' })
export class RobotToken {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'robot_id' })
  robotId: string;

  @ManyToOne(() => Robot, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'robot_id' })
  robot: Relation<Robot>;

  @Column({ type: 'text' })
  label: string;

  /** First characters of the secret, so people can tell tokens apart. */
  @Column({ type: 'text' })
  prefix: string;

  @Index({ unique: true })
  @Column({ type: 'text', name: 'token_hash' })
  tokenHash: string;

  @Column({ type: 'text', name: 'created_by_id', nullable: true })
  createdById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'created_by_id' })
  createdBy: Relation<User> | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'datetime', name: 'last_used_at', nullable: true })
  lastUsedAt: Date | null;

  @Column({ type: 'datetime', name: 'revoked_at', nullable: true })
  revokedAt: Date | null;
}
