import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Extra header lines a queued mail carries (the report's List-Unsubscribe and List-Unsubscribe-Post). */
export class MailHeaders1796221000000 implements MigrationInterface {
    name = 'MailHeaders1796221000000';

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`ALTER TABLE "outgoing_mail" ADD COLUMN "headers" text`);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`ALTER TABLE "outgoing_mail" DROP COLUMN "headers"`);
    }
}
