import type { MigrationInterface, QueryRunner } from "typeorm";

export class MapHealth1796172987767 implements MigrationInterface {
    name = 'MapHealth1796172987767'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "scan_samples" ("map_version_id" text NOT NULL, "robot_id" text NOT NULL, "scanner" text NOT NULL, "day" text NOT NULL, "count" integer NOT NULL, "data" blob NOT NULL, PRIMARY KEY ("map_version_id", "robot_id", "scanner", "day"))`);
        await queryRunner.query(`CREATE TABLE "job_runs" ("id" text PRIMARY KEY NOT NULL, "job" text NOT NULL, "site_id" text, "trigger" text NOT NULL, "started_at" datetime NOT NULL, "finished_at" datetime, "status" text NOT NULL, "error" text, "figures" text)`);
        await queryRunner.query(`CREATE INDEX "IDX_837739ee16579937608c29e421" ON "job_runs" ("job", "started_at") `);
        await queryRunner.query(`CREATE TABLE "robot_flags" ("id" text PRIMARY KEY NOT NULL, "robot_id" text NOT NULL, "scanner" text NOT NULL, "status" text NOT NULL, "raised_at" datetime NOT NULL, "figures" text NOT NULL, "mount" text, "cleared_at" datetime, "cleared_by_id" text, "note" text)`);
        await queryRunner.query(`CREATE INDEX "IDX_90a67906b83b2e40e038dfe9bc" ON "robot_flags" ("robot_id", "status") `);
        await queryRunner.query(`CREATE TABLE "zones" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "map_version_id" text NOT NULL, "number" integer NOT NULL, "kind" text NOT NULL, "status" text NOT NULL, "persistence" text NOT NULL, "outline" text NOT NULL, "bbox" text NOT NULL, "centroid" text NOT NULL, "cell_count" integer NOT NULL, "area_m2" real NOT NULL, "mean_hit_rate" real NOT NULL, "hit_rate_low" real NOT NULL, "hit_rate_high" real NOT NULL, "observations" integer NOT NULL, "days_observed" integer NOT NULL, "days_flagged" integer NOT NULL, "traffic_per_m2_day" real NOT NULL, "severity" real NOT NULL, "timeline" text NOT NULL, "cells" blob NOT NULL, "first_seen_day" text NOT NULL, "last_seen_day" text NOT NULL, "missed_runs" integer NOT NULL DEFAULT (0), "status_note" text, "status_changed_at" datetime, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "updated_at" datetime NOT NULL DEFAULT (datetime('now')))`);
        await queryRunner.query(`CREATE INDEX "IDX_e9335585e3d409fc748a2b6e8a" ON "zones" ("site_id", "status") `);
        await queryRunner.query(`DROP INDEX "IDX_90a67906b83b2e40e038dfe9bc"`);
        await queryRunner.query(`CREATE TABLE "temporary_robot_flags" ("id" text PRIMARY KEY NOT NULL, "robot_id" text NOT NULL, "scanner" text NOT NULL, "status" text NOT NULL, "raised_at" datetime NOT NULL, "figures" text NOT NULL, "mount" text, "cleared_at" datetime, "cleared_by_id" text, "note" text, CONSTRAINT "FK_23af9e36c3da2774d5b28c71c96" FOREIGN KEY ("robot_id") REFERENCES "robots" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_d44cb6ecf8edb2425fc47749515" FOREIGN KEY ("cleared_by_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`);
        await queryRunner.query(`INSERT INTO "temporary_robot_flags"("id", "robot_id", "scanner", "status", "raised_at", "figures", "mount", "cleared_at", "cleared_by_id", "note") SELECT "id", "robot_id", "scanner", "status", "raised_at", "figures", "mount", "cleared_at", "cleared_by_id", "note" FROM "robot_flags"`);
        await queryRunner.query(`DROP TABLE "robot_flags"`);
        await queryRunner.query(`ALTER TABLE "temporary_robot_flags" RENAME TO "robot_flags"`);
        await queryRunner.query(`CREATE INDEX "IDX_90a67906b83b2e40e038dfe9bc" ON "robot_flags" ("robot_id", "status") `);
        await queryRunner.query(`DROP INDEX "IDX_e9335585e3d409fc748a2b6e8a"`);
        await queryRunner.query(`CREATE TABLE "temporary_zones" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "map_version_id" text NOT NULL, "number" integer NOT NULL, "kind" text NOT NULL, "status" text NOT NULL, "persistence" text NOT NULL, "outline" text NOT NULL, "bbox" text NOT NULL, "centroid" text NOT NULL, "cell_count" integer NOT NULL, "area_m2" real NOT NULL, "mean_hit_rate" real NOT NULL, "hit_rate_low" real NOT NULL, "hit_rate_high" real NOT NULL, "observations" integer NOT NULL, "days_observed" integer NOT NULL, "days_flagged" integer NOT NULL, "traffic_per_m2_day" real NOT NULL, "severity" real NOT NULL, "timeline" text NOT NULL, "cells" blob NOT NULL, "first_seen_day" text NOT NULL, "last_seen_day" text NOT NULL, "missed_runs" integer NOT NULL DEFAULT (0), "status_note" text, "status_changed_at" datetime, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "updated_at" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_9488b4e52fccc335e197e5d9ca2" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_7f0bc9d32ba0c5f05978e6f889f" FOREIGN KEY ("map_version_id") REFERENCES "map_versions" ("id") ON DELETE CASCADE ON UPDATE NO ACTION)`);
        await queryRunner.query(`INSERT INTO "temporary_zones"("id", "site_id", "map_version_id", "number", "kind", "status", "persistence", "outline", "bbox", "centroid", "cell_count", "area_m2", "mean_hit_rate", "hit_rate_low", "hit_rate_high", "observations", "days_observed", "days_flagged", "traffic_per_m2_day", "severity", "timeline", "cells", "first_seen_day", "last_seen_day", "missed_runs", "status_note", "status_changed_at", "created_at", "updated_at") SELECT "id", "site_id", "map_version_id", "number", "kind", "status", "persistence", "outline", "bbox", "centroid", "cell_count", "area_m2", "mean_hit_rate", "hit_rate_low", "hit_rate_high", "observations", "days_observed", "days_flagged", "traffic_per_m2_day", "severity", "timeline", "cells", "first_seen_day", "last_seen_day", "missed_runs", "status_note", "status_changed_at", "created_at", "updated_at" FROM "zones"`);
        await queryRunner.query(`DROP TABLE "zones"`);
        await queryRunner.query(`ALTER TABLE "temporary_zones" RENAME TO "zones"`);
        await queryRunner.query(`CREATE INDEX "IDX_e9335585e3d409fc748a2b6e8a" ON "zones" ("site_id", "status") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_e9335585e3d409fc748a2b6e8a"`);
        await queryRunner.query(`ALTER TABLE "zones" RENAME TO "temporary_zones"`);
        await queryRunner.query(`CREATE TABLE "zones" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "map_version_id" text NOT NULL, "number" integer NOT NULL, "kind" text NOT NULL, "status" text NOT NULL, "persistence" text NOT NULL, "outline" text NOT NULL, "bbox" text NOT NULL, "centroid" text NOT NULL, "cell_count" integer NOT NULL, "area_m2" real NOT NULL, "mean_hit_rate" real NOT NULL, "hit_rate_low" real NOT NULL, "hit_rate_high" real NOT NULL, "observations" integer NOT NULL, "days_observed" integer NOT NULL, "days_flagged" integer NOT NULL, "traffic_per_m2_day" real NOT NULL, "severity" real NOT NULL, "timeline" text NOT NULL, "cells" blob NOT NULL, "first_seen_day" text NOT NULL, "last_seen_day" text NOT NULL, "missed_runs" integer NOT NULL DEFAULT (0), "status_note" text, "status_changed_at" datetime, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "updated_at" datetime NOT NULL DEFAULT (datetime('now')))`);
        await queryRunner.query(`INSERT INTO "zones"("id", "site_id", "map_version_id", "number", "kind", "status", "persistence", "outline", "bbox", "centroid", "cell_count", "area_m2", "mean_hit_rate", "hit_rate_low", "hit_rate_high", "observations", "days_observed", "days_flagged", "traffic_per_m2_day", "severity", "timeline", "cells", "first_seen_day", "last_seen_day", "missed_runs", "status_note", "status_changed_at", "created_at", "updated_at") SELECT "id", "site_id", "map_version_id", "number", "kind", "status", "persistence", "outline", "bbox", "centroid", "cell_count", "area_m2", "mean_hit_rate", "hit_rate_low", "hit_rate_high", "observations", "days_observed", "days_flagged", "traffic_per_m2_day", "severity", "timeline", "cells", "first_seen_day", "last_seen_day", "missed_runs", "status_note", "status_changed_at", "created_at", "updated_at" FROM "temporary_zones"`);
        await queryRunner.query(`DROP TABLE "temporary_zones"`);
        await queryRunner.query(`CREATE INDEX "IDX_e9335585e3d409fc748a2b6e8a" ON "zones" ("site_id", "status") `);
        await queryRunner.query(`DROP INDEX "IDX_90a67906b83b2e40e038dfe9bc"`);
        await queryRunner.query(`ALTER TABLE "robot_flags" RENAME TO "temporary_robot_flags"`);
        await queryRunner.query(`CREATE TABLE "robot_flags" ("id" text PRIMARY KEY NOT NULL, "robot_id" text NOT NULL, "scanner" text NOT NULL, "status" text NOT NULL, "raised_at" datetime NOT NULL, "figures" text NOT NULL, "mount" text, "cleared_at" datetime, "cleared_by_id" text, "note" text)`);
        await queryRunner.query(`INSERT INTO "robot_flags"("id", "robot_id", "scanner", "status", "raised_at", "figures", "mount", "cleared_at", "cleared_by_id", "note") SELECT "id", "robot_id", "scanner", "status", "raised_at", "figures", "mount", "cleared_at", "cleared_by_id", "note" FROM "temporary_robot_flags"`);
        await queryRunner.query(`DROP TABLE "temporary_robot_flags"`);
        await queryRunner.query(`CREATE INDEX "IDX_90a67906b83b2e40e038dfe9bc" ON "robot_flags" ("robot_id", "status") `);
        await queryRunner.query(`DROP INDEX "IDX_e9335585e3d409fc748a2b6e8a"`);
        await queryRunner.query(`DROP TABLE "zones"`);
        await queryRunner.query(`DROP INDEX "IDX_90a67906b83b2e40e038dfe9bc"`);
        await queryRunner.query(`DROP TABLE "robot_flags"`);
        await queryRunner.query(`DROP INDEX "IDX_837739ee16579937608c29e421"`);
        await queryRunner.query(`DROP TABLE "job_runs"`);
        await queryRunner.query(`DROP TABLE "scan_samples"`);
    }

}
