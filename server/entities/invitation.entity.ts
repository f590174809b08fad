import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Organization } from './organization.entity.js';
import type { Role } from './user.entity.js';
import { User } from './user.entity.js';

/** An admin's invitation to set a password and join an organization with a role. */
@Entity({ name: 'invitations' })
export class Invitation {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text' })
  email: string;

  @Column({ type: 'text' })
  name: string;

  @Column({ type: 'text' })
  role: Role;

  @Column({ type: 'text', name: 'organization_id' })
  organizationId: string;

  @ManyToOne(() => Organization, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'organization_id' })
  organization: Relation<Organization>;

  /** SHA-256 of the link's token; the token itself is never stored. */
  @Index({ unique: true })
  @Column({ type: 'text', name: 'token_hash' })
  tokenHash: string;

  @Column({ type: 'text', name: 'invited_by_id', nullable: true })
  invitedById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'invited_by_id' })
  invitedBy: Relation<User> | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'datetime', name: 'expires_at' })
  expiresAt: Date;

  @Column({ type: 'datetime', name: 'accepted_at', nullable: true })
  acceptedAt: Date | null;

  @Column({ type: 'datetime', name: 'revoked_at', nullable: true })
  revokedAt: Date | null;
}
