import type { MigrationInterface, QueryRunner } from "typeorm";

export class MonthlyReports1796210000000 implements MigrationInterface {
    name = 'MonthlyReports1796210000000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "report_recipients" ("id" text PRIMARY KEY NOT NULL, "organization_id" text NOT NULL, "email" text NOT NULL, "name" text NOT NULL DEFAULT (''), "created_at" datetime NOT NULL DEFAULT (datetime('now')), "created_by_id" text, "unsubscribed_at" datetime, CONSTRAINT "FK_report_recipients_org" FOREIGN KEY ("organization_id") REFERENCES "organizations" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_report_recipients_created_by" FOREIGN KEY ("created_by_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_report_recipients_org_email" ON "report_recipients" ("organization_id", "email") `);
        await queryRunner.query(`CREATE TABLE "monthly_reports" ("id" text PRIMARY KEY NOT NULL, "organization_id" text NOT NULL, "month" text NOT NULL, "status" text NOT NULL, "figures" text, "html" text, "text" text, "map_images" text, "generated_at" datetime, "sent_at" datetime, CONSTRAINT "FK_monthly_reports_org" FOREIGN KEY ("organization_id") REFERENCES "organizations" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_monthly_reports_org_month" ON "monthly_reports" ("organization_id", "month") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_monthly_reports_org_month"`);
        await queryRunner.query(`DROP TABLE "monthly_reports"`);
        await queryRunner.query(`DROP INDEX "IDX_report_recipients_org_email"`);
        await queryRunner.query(`DROP TABLE "report_recipients"`);
    }

}
