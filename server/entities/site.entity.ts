import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Organization } from './organization.entity.js';

/** A customer's building whose map Driftline watches. */
@Entity({ name: 'sites' })
@Index(['organizationId', 'name'], { unique: true })
export class Site {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text' })
  name: string;

  @Column({ type: 'text' })
  city: string;

  /** IANA time zone: site-local days and the nightly detection hour use it. */
  @Column({ type: 'text' })
  timezone: string;

  @Column({ type: 'text', name: 'organization_id' })
  organizationId: string;

  @ManyToOne(() => Organization, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'organization_id' })
  organization: Relation<Organization>;

  /** Site settings (thresholds) as JSON; absent keys take the documented defaults. */
  @Column({ type: 'simple-json', default: '{}' })
  settings: Record<string, unknown>;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;
}
