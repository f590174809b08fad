import type { MigrationInterface, QueryRunner } from "typeorm";

export class RemapRequests1796185100000 implements MigrationInterface {
    name = 'RemapRequests1796185100000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "remap_requests" ("id" text PRIMARY KEY NOT NULL, "site_id" text NOT NULL, "number" integer NOT NULL, "title" text NOT NULL, "status" text NOT NULL, "priority_score" real NOT NULL, "note" text NOT NULL DEFAULT (''), "cancel_reason" text, "area" text NOT NULL, "estimate" text NOT NULL, "window_start" datetime, "window_end" datetime, "window_timezone" text, "assignee_id" text, "requested_by_id" text, "approved_by_id" text, "approved_at" datetime, "map_version_before_id" text NOT NULL, "map_version_after_id" text, "verification" text, "created_at" datetime NOT NULL DEFAULT (datetime('now')), "updated_at" datetime NOT NULL DEFAULT (datetime('now')), CONSTRAINT "FK_939ab34c9a960994cb95f7996e9" FOREIGN KEY ("site_id") REFERENCES "sites" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_a777b0b4196679bd233bfb0b0d2" FOREIGN KEY ("assignee_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_45fdaf54c50744798258983e85e" FOREIGN KEY ("requested_by_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_e11c240eb4b6087db1d68426b64" FOREIGN KEY ("approved_by_id") REFERENCES "users" ("id") ON DELETE SET NULL ON UPDATE NO ACTION, CONSTRAINT "FK_7555e04a2b3c63bc5253e4b9628" FOREIGN KEY ("map_version_before_id") REFERENCES "map_versions" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_aa43ca0578a0e17c6f9859eac49" FOREIGN KEY ("map_version_after_id") REFERENCES "map_versions" ("id") ON DELETE SET NULL ON UPDATE NO ACTION)`);
        await queryRunner.query(`CREATE INDEX "IDX_remap_requests_window" ON "remap_requests" ("window_start") `);
        await queryRunner.query(`CREATE UNIQUE INDEX "IDX_remap_requests_site_number" ON "remap_requests" ("site_id", "number") `);
        await queryRunner.query(`CREATE TABLE "remap_request_zones" ("remap_id" text NOT NULL, "zone_id" text NOT NULL, "previous_status" text NOT NULL, CONSTRAINT "FK_afb01c1de9c10aaba971b76e9f3" FOREIGN KEY ("remap_id") REFERENCES "remap_requests" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, CONSTRAINT "FK_cd821f3fff6d12f1eec444d8c9d" FOREIGN KEY ("zone_id") REFERENCES "zones" ("id") ON DELETE CASCADE ON UPDATE NO ACTION, PRIMARY KEY ("remap_id", "zone_id"))`);
        await queryRunner.query(`CREATE INDEX "IDX_remap_request_zones_zone" ON "remap_request_zones" ("zone_id") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_remap_request_zones_zone"`);
        await queryRunner.query(`DROP TABLE "remap_request_zones"`);
        await queryRunner.query(`DROP INDEX "IDX_remap_requests_site_number"`);
        await queryRunner.query(`DROP INDEX "IDX_remap_requests_window"`);
        await queryRunner.query(`DROP TABLE "remap_requests"`);
    }

}
