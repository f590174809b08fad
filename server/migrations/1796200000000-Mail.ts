import type { MigrationInterface, QueryRunner } from "typeorm";

export class Mail1796200000000 implements MigrationInterface {
    name = 'Mail1796200000000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "outgoing_mail" ("id" text PRIMARY KEY NOT NULL, "dedupe_key" text NOT NULL, "kind" text NOT NULL, "organization_id" text, "to_email" text NOT NULL, "to_name" text, "subject" text NOT NULL, "html" text NOT NULL, "text" text NOT NULL, "attachments" text NOT NULL, "status" text NOT NULL, "attempts" integer NOT NULL DEFAULT (0), "next_attempt_at" datetime NOT NULL, "claimed_at" datetime, "last_error" text, "sent_at" datetime, "message_id" text NOT NULL, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "report_id" text)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_outgoing_mail_dedupe" ON "outgoing_mail" ("dedupe_key") `);
        await queryRunner.query(`CREATE INDEX "IDX_outgoing_mail_due" ON "outgoing_mail" ("status", "next_attempt_at") `);
        await queryRunner.query(`CREATE TABLE "captured_mail" ("id" text PRIMARY KEY NOT NULL, "received_at" datetime NOT NULL, "envelope_from" text NOT NULL, "envelope_to" text NOT NULL, "subject" text NOT NULL, "message_id" text NOT NULL, "raw" blob NOT NULL, "size" integer NOT NULL)`);
        await queryRunner.query(`CREATE INDEX "IDX_captured_mail_received" ON "captured_mail" ("received_at") `);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_captured_mail_message_id" ON "captured_mail" ("message_id") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_captured_mail_message_id"`);
        await queryRunner.query(`DROP INDEX "IDX_captured_mail_received"`);
        await queryRunner.query(`DROP TABLE "captured_mail"`);
        await queryRunner.query(`DROP INDEX "IDX_outgoing_mail_due"`);
        await queryRunner.query(`DROP INDEX "IDX_outgoing_mail_dedupe"`);
        await queryRunner.query(`DROP TABLE "outgoing_mail"`);
    }

}
