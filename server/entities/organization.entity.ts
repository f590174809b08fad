import { Column, CreateDateColumn, Entity, PrimaryColumn } from 'typeorm';

/** The operator runs Driftline and the fleets; customers own sites. */
export type OrganizationKind = 'operator' | 'customer';

@Entity({ name: 'organizations' })
export class Organization {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', unique: true })
  name: string;

  @Column({ type: 'text' })
  kind: OrganizationKind;

  /** IANA time zone, used for the monthly report. */
  @Column({ type: 'text' })
  timezone: string;

  @CreateDateColumn({ type: 'datetime', name: 'created_at' })
  createdAt: Date;
}
