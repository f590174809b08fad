import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/data-source.js';

describe('migrations', () => {
  it('when every migration has run, then the schema matches the entities (nothing left for TypeORM to change)', async () => {
    const db = await openDatabase({ database: ':memory:' });
    try {
      const pending = await db.driver.createSchemaBuilder().log();
      expect(pending.upQueries.map((q) => q.query)).toEqual([]);
    } finally {
      await db.destroy();
    }
  });
});
