import { Column, CreateDateColumn, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Organization } from './organization.entity.js';
import { User } from './user.entity.js';

/** Someone who receives an organization's monthly report by e-mail; unsubscribing keeps the row, stamped. */
@Entity({ name: 'report_recipients' })
@Index('IDX_report_recipients_org_email', ['organizationId', 'email'], { unique: true })
export class Recipient {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'organization_id' })
  organizationId: string;

  @ManyToOne(() => Organization, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'organization_id', foreignKeyConstraintName: 'FK_report_recipients_org' })
  organization: Relation<Organization>;

  /** Lower case. */
  @Column({ type: 'text' })
  email: string;

  @Column({ type: 'text', default: '' })
  name: string;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;

  @Column({ type: 'text', name: 'created_by_id', nullable: true })
  createdById: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'created_by_id', foreignKeyConstraintName: 'FK_report_recipients_created_by' })
  createdBy: Relation<User> | null;

  @Column({ type: 'datetime', name: 'unsubscribed_at', nullable: true })
  unsubscribedAt: Date | null;
}
