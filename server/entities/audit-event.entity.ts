import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryGeneratedColumn, type Relation } from 'typeorm';
import { User } from './user.entity.js';

/** Who did what, when: one row per change a person or job made. */
@Entity({ name: 'audit_events' })
export class AuditEvent {
  @PrimaryGeneratedColumn({ type: 'integer' })
  id: number;

  @Index()
  @Column({ type: 'datetime' })
  at: Date;

  @Column({ type: 'text', name: 'actor_id', nullable: true })
  actorId: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'actor_id' })
  actor: Relation<User> | null;

  /** Organization the event concerns, for scoped reading; null for operator-wide events. */
  @Column({ type: 'text', name: 'organization_id', nullable: true })
  organizationId: string | null;

  @Column({ type: 'text' })
  action: string;

  @Column({ type: 'text', name: 'target_type' })
  targetType: string;

  @Column({ type: 'text', name: 'target_id', nullable: true })
  targetId: string | null;

  @Column({ type: 'text' })
  summary: string;

  @Column({ type: 'simple-json', nullable: true })
  details: Record<string, unknown> | null;
}
