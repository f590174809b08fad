import type { MigrationInterface, QueryRunner } from "typeorm";

export class PoseTrails1796180555339 implements MigrationInterface {
    name = 'PoseTrails1796180555339'

    public async up(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`CREATE TABLE "pose_trails" ("id" text PRIMARY KEY NOT NULL, "map_version_id" text NOT NULL, "robot_id" text NOT NULL, "day" text NOT NULL, "first_ms" integer NOT NULL, "last_ms" integer NOT NULL, "count" integer NOT NULL, "data" blob NOT NULL)`);
        await queryRunner.query(`CREATE INDEX "IDX_562da611a9fb6e543a3c01bb94" ON "pose_trails" ("map_version_id", "last_ms") `);
    }

    public async down(queryRunner: QueryRunner): Promise<void> {
        await queryRunner.query(`DROP INDEX "IDX_562da611a9fb6e543a3c01bb94"`);
        await queryRunner.query(`DROP TABLE "pose_trails"`);
    }

}
