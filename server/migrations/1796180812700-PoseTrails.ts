import type { MigrationInterface, QueryRunner } from "typeorm";

export class PoseTrails1796180812700 implements MigrationInterface {
    name = 'PoseTrails1796180812700'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "pose_trails" ("id" text PRIMARY KEY NOT NULL, "map_version_id" text NOT NULL, "robot_id" text NOT NULL, "day" text NOT NULL, "first_ms" integer NOT NULL, "last_ms" integer NOT NULL, "count" integer NOT NULL, "data" blob NOT NULL)`);
        await queryRunner.query(`CREATE INDEX "IDX_562da611a9fb6e543a3c01bb94" ON "pose_trails" ("map_version_id", "last_ms") `);
        await queryRunner.query(`DROP INDEX "IDX_facc95ab574ba04282bc15c8ff"`);
        await queryRunner.query(`DROP INDEX "IDX_74e157d784e52c4ac873b8537e"`);
        await queryRunner.query(`DROP INDEX "IDX_22763e995cba74e8d506f7a9cf"`);
        await queryRunner.query(`CREATE TABLE "temporary_scan_batches" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "robot_id" text, "map_version_id" text NOT NULL, "source" text NOT NULL, "file_name" text, "idempotency_key" text, "content_hash" text, "status" text NOT NULL, "received_at" datetime NOT NULL, "finished_at" datetime, "bytes_read" integer NOT NULL DEFAULT (0), "bytes_total" integer, "lines" integer NOT NULL DEFAULT (0), "scans" integer NOT NULL DEFAULT (0), "beams" integer NOT NULL DEFAULT (0), "returns" integer NOT NULL DEFAULT (0), "explained" integer NOT NULL DEFAULT (0), "out_of_map" integer NOT NULL DEFAULT (0), "rejected_count" integer NOT NULL DEFAULT (0), "rejected_lines" text NOT NULL, "days" text NOT NULL, "error" text, "poses" integer NOT NULL DEFAULT (0), CONSTRAINT "FK_643e50b6e99109fe855004fd3a1" FOREIGN KEY ("map_version_id") REFERENCES "map_versions" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_22763e995cba74e8d506f7a9cfb" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`INSERT INTO "temporary_scan_batches"("id", "site_id", "robot_id", "map_version_id", "source", "file_name", "idempotency_key", "content_hash", "status", "received_at", "finished_at", "bytes_read", "bytes_total", "lines", "scans", "beams", "returns", "explained", "out_of_map", "rejected_count", "rejected_lines", "days", "error") SELECT "id", "site_id", "robot_id", "map_version_id", "source", "file_name", "idempotency_key", "content_hash", "status", "received_at", "finished_at", "bytes_read", "bytes_total", "lines", "scans", "beams", "returns", "explained", "out_of_map", "rejected_count", "rejected_lines", "days", "error" FROM "scan_batches"`);
        await queryRunner.query(`DROP TABLE "scan_batches"`);
        await queryRunner.query(`ALTER TABLE "temporary_scan_batches" RENAME TO "scan_batches"`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_facc95ab574ba04282bc15c8ff" ON "scan_batches" ("site_id", "idempotency_key") WHERE idempotency_key IS NOT NULL`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_74e157d784e52c4ac873b8537e" ON "scan_batches" ("site_id", "content_hash") WHERE status = 'counted'`);
        await queryRunner.query(`CREATE INDEX "IDX_22763e995cba74e8d506f7a9cf" ON "scan_batches" ("site_id") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_22763e995cba74e8d506f7a9cf"`);
        await queryRunner.query(`DROP INDEX "IDX_74e157d784e52c4ac873b8537e"`);
        await queryRunner.query(`DROP INDEX "IDX_facc95ab574ba04282bc15c8ff"`);
        await queryRunner.query(`ALTER TABLE "scan_batches" RENAME TO "temporary_scan_batches"`);
        await queryRunner.query(`CREATE TABLE "scan_batches" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "robot_id" text, "map_version_id" text NOT NULL, "source" text NOT NULL, "file_name" text, "idempotency_key" text, "content_hash" text, "status" text NOT NULL, "received_at" datetime NOT NULL, "finished_at" datetime, "bytes_read" integer NOT NULL DEFAULT (0), "bytes_total" integer, "lines" integer NOT NULL DEFAULT (0), "scans" integer NOT NULL DEFAULT (0), "beams" integer NOT NULL DEFAULT (0), "returns" integer NOT NULL DEFAULT (0), "explained" integer NOT NULL DEFAULT (0), "out_of_map" integer NOT NULL DEFAULT (0), "rejected_count" integer NOT NULL DEFAULT (0), "rejected_lines" text NOT NULL, "days" text NOT NULL, "error" text, CONSTRAINT "FK_643e50b6e99109fe855004fd3a1" FOREIGN KEY ("map_version_id") REFERENCES "map_versions" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_22763e995cba74e8d506f7a9cfb" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`INSERT INTO "scan_batches"("id", "site_id", "robot_id", "map_version_id", "source", "file_name", "idempotency_key", "content_hash", "status", "received_at", "finished_at", "bytes_read", "bytes_total", "lines", "scans", "beams", "returns", "explained", "out_of_map", "rejected_count", "rejected_lines", "days", "error") SELECT "id", "site_id", "robot_id", "map_version_id", "source", "file_name", "idempotency_key", "content_hash", "status", "received_at", "finished_at", "bytes_read", "bytes_total", "lines", "scans", "beams", "returns", "explained", "out_of_map", "rejected_count", "rejected_lines", "days", "error" FROM "temporary_scan_batches"`);
        await queryRunner.query(`DROP TABLE "temporary_scan_batches"`);
        await queryRunner.query(`CREATE INDEX "IDX_22763e995cba74e8d506f7a9cf" ON "scan_batches" ("site_id") `);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_74e157d784e52c4ac873b8537e" ON "scan_batches" ("site_id", "content_hash") WHERE status = 'counted'`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_facc95ab574ba04282bc15c8ff" ON "scan_batches" ("site_id", "idempotency_key") WHERE idempotency_key IS NOT NULL`);
        await queryRunner.query(`DROP INDEX "IDX_562da611a9fb6e543a3c01bb94"`);
        await queryRunner.query(`DROP TABLE "pose_trails"`);
    }

}
