import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { User } from './user.entity.js';

// Column names and types are those the session library's SQLite adapter reads and writes.
@Entity({ name: 'sessions' })
export class Session {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Index()
  @Column({ type: 'text', name: 'user_id' })
  userId: string;

  @ManyToOne(() => User, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'user_id' })
  user: Relation<User>;

  /** Unix seconds. */
  @Column({ type: 'integer', name: 'expires_at' })
  expiresAt: number;
}
