import type { MigrationInterface, QueryRunner } from "typeorm";

export class HourlyTraffic1796183000000 implements MigrationInterface {
    name = 'HourlyTraffic1796183000000'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "hourly_traffic" ("site_id" text NOT NULL, "hour_start_ms" integer NOT NULL, "scans" integer NOT NULL, "returns" integer NOT NULL, PRIMARY KEY ("site_id", "hour_start_ms"))`);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP TABLE "hourly_traffic"`);
    }

}
