import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Organization } from './organization.entity.js';

/** DESIGN.md §2: operator roles (admin, mapper) and customer roles (site_manager, viewer). */
export type Role = 'admin' | 'mapper' | 'site_manager' | 'viewer';
export const ROLES: readonly Role[] = ['admin', 'mapper', 'site_manager', 'viewer'];
export const OPERATOR_ROLES: readonly Role[] = ['admin', 'mapper'];
export const CUSTOMER_ROLES: readonly Role[] = ['site_manager', 'viewer'];

export type UserStatus = 'active' | 'disabled';

// The table is shared with the session library, which reads users by `id`.
@Entity({ name: 'users' })
export class User {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Index({ unique: true })
  @Column({ type: 'text' })
  email: string;

  @Column({ type: 'text' })
  name: string;

  @Column({ type: 'text' })
  role: Role;

  @Column({ type: 'text', name: 'organization_id' })
  organizationId: string;

  @ManyToOne(() => Organization, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'organization_id' })
  organization: Relation<Organization>;

  @Column({ type: 'text', name: 'password_hash' })
  passwordHash: string;

  @Column({ type: 'text', default: 'active' })
  status: UserStatus;

  @Column({ type: 'datetime', name: 'last_sign_in_at', nullable: true })
  lastSignInAt: Date | null;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;
}
