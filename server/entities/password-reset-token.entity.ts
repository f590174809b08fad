import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { User } from './user.entity.js';

/**
 * One e-mailed password reset link. Only the SHA-256 of its token is kept. A link that a newer
 * request or a completed reset replaced gets `expiresAt` moved to that moment, so the row stays
 * (the per-account request limit counts rows by `createdAt`).
 */
@Entity({ name: 'password_reset_tokens' })
@Index('IDX_password_reset_tokens_user_created', ['userId', 'createdAt'])
export class PasswordResetToken {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'user_id' })
  userId: string;

  @ManyToOne(() => User, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'user_id', foreignKeyConstraintName: 'FK_password_reset_tokens_user' })
  user: Relation<User>;

  /** Hex SHA-256 of the link's token (32 random bytes, base64url); the token itself is never stored. */
  @Index('IDX_password_reset_tokens_hash', { unique: true })
  @Column({ type: 'text', name: 'token_hash' })
  tokenHash: string;

  @Column({ type: 'datetime', name: 'expires_at' })
  expiresAt: Date;

  /** When the link set a new password; set once, by a guarded UPDATE. */
  @Column({ type: 'datetime', name: 'used_at', nullable: true })
  usedAt: Date | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  /** The address the request came from, as the server saw it. */
  @Column({ type: 'text', name: 'requested_from', nullable: true })
  requestedFrom: string | null;
}
