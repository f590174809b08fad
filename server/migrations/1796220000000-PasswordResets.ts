import type { MigrationInterface, QueryRunner } from "typeorm";

export class PasswordResets1796220000000 implements MigrationInterface {
    name = 'PasswordResets1796220000000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "password_reset_tokens" ("id" text PRIMARY KEY NOT NULL, "user_id" text NOT NULL, "token_hash" text NOT NULL, "expires_at" datetime NOT NULL, "used_at" datetime, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "requested_from" text, CONSTRAINT "FK_password_reset_tokens_user" FOREIGN KEY ("user_id") REFERENCES "users" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_password_reset_tokens_hash" ON "password_reset_tokens" ("token_hash") `);
        await queryRunner.query(`CREATE INDEX "IDX_password_reset_tokens_user_created" ON "password_reset_tokens" ("user_id", "created_at") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_password_reset_tokens_user_created"`);
        await queryRunner.query(`DROP INDEX "IDX_password_reset_tokens_hash"`);
        await queryRunner.query(`DROP TABLE "password_reset_tokens"`);
    }

}
