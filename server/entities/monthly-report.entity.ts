import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { Organization } from './organization.entity.js';

export type MonthlyReportStatus = 'generating' | 'ready' | 'sent' | 'failed';

/** One organization's report of one calendar month (its own time zone); one row per (organization, month). */
@Entity({ name: 'monthly_reports' })
@Index('IDX_monthly_reports_org_month', ['organizationId', 'month'], { unique: true })
export class MonthlyReport {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'organization_id' })
  organizationId: string;

  @ManyToOne(() => Organization, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'organization_id', foreignKeyConstraintName: 'FK_monthly_reports_org' })
  organization: Relation<Organization>;

  /** 'YYYY-MM'. */
  @Column({ type: 'text' })
  month: string;

  @Column({ type: 'text' })
  status: MonthlyReportStatus;

  /** The figures the report was rendered from (ReportFiguresService). */
  @Column({ type: 'simple-json', nullable: true })
  figures: unknown;

  @Column({ type: 'text', nullable: true })
  html: string | null;

  @Column({ type: 'text', nullable: true })
  text: string | null;

  /** The inline map pictures: content id, file name and base64 PNG. */
  @Column({ type: 'simple-json', name: 'map_images', nullable: true })
  mapImages: Array<{ cid: string; filename: string; contentBase64: string }> | null;

  @Column({ type: 'datetime', name: 'generated_at', nullable: true })
  generatedAt: Date | null;

  @Column({ type: 'datetime', name: 'sent_at', nullable: true })
  sentAt: Date | null;
}
