import type { MigrationInterface, QueryRunner } from "typeorm";

export class DockingStations1796190000000 implements MigrationInterface {
    name = 'DockingStations1796190000000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "docking_stations" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "name" text NOT NULL, "tolerance_mm" real, "tolerance_deg" real, "model_version_id" text, "model_attached_at" datetime, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "created_by_id" text, CONSTRAINT "FK_docking_stations_site" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_docking_stations_model" FOREIGN KEY ("model_version_id") REFERENCES "map_versions" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_docking_stations_created_by" FOREIGN KEY ("created_by_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_docking_stations_site_name" ON "docking_stations" ("site_id", "name") `);
        await queryRunner.query(`CREATE TABLE "docking_batches" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "robot_id" text NOT NULL, "idempotency_key" text, "content_hash" text NOT NULL, "received_at" datetime NOT NULL, "lines" integer NOT NULL, "counted" integer NOT NULL, "rejected_count" integer NOT NULL, "rejected_lines" text NOT NULL, CONSTRAINT "FK_docking_batches_site" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_docking_batches_site_key" ON "docking_batches" ("site_id", "idempotency_key") WHERE idempotency_key IS NOT NULL`);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_docking_batches_site_hash" ON "docking_batches" ("site_id", "content_hash") `);
        await queryRunner.query(`CREATE TABLE "docking_results" ("id" text PRIMARY KEY NOT NULL, "station_id" text NOT NULL, "robot_id" text NOT NULL, "batch_id" text NOT NULL, "model_version_id" text, "t_ms" integer NOT NULL, "dx" real NOT NULL, "dy" real NOT NULL, "dyaw" real NOT NULL, CONSTRAINT "FK_docking_results_station" FOREIGN KEY ("station_id") REFERENCES "docking_stations" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_docking_results_batch" FOREIGN KEY ("batch_id") REFERENCES "docking_batches" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE INDEX "IDX_docking_results_station_time" ON "docking_results" ("station_id", "t_ms") `);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_docking_results_unique" ON "docking_results" ("station_id", "robot_id", "t_ms") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_docking_results_unique"`);
        await queryRunner.query(`DROP INDEX "IDX_docking_results_station_time"`);
        await queryRunner.query(`DROP TABLE "docking_results"`);
        await queryRunner.query(`DROP INDEX "IDX_docking_batches_site_hash"`);
        await queryRunner.query(`DROP INDEX "IDX_docking_batches_site_key"`);
        await queryRunner.query(`DROP TABLE "docking_batches"`);
        await queryRunner.query(`DROP INDEX "IDX_docking_stations_site_name"`);
        await queryRunner.query(`DROP TABLE "docking_stations"`);
    }

}
