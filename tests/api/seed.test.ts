import pino from 'pino';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/data-source.js';
import { Organization, Site, User } from '../../server/entities/index.js';
import { seedDemo } from '../../server/services/demo-seed.service.js';

describe('demo seed', () => {
  it('when seeding twice, then the second run changes nothing', async () => {
    const db = await openDatabase({ database: ':memory:' });
    const log = pino({ level: 'silent' });
    expect(await seedDemo(db, log)).toBe(true);
    const counts = async () => [await db.getRepository(Organization).count(), await db.getRepository(User).count(), await db.getRepository(Site).count()];
    const first = await counts();
    expect(await seedDemo(db, log)).toBe(false);
    expect(await counts()).toEqual(first);
    expect(first).toEqual([3, 5, 5]);
    await db.destroy();
  });

  it('when the database already has an organization of its own, then the seed leaves it alone', async () => {
    const db = await openDatabase({ database: ':memory:' });
    await db.getRepository(Organization).insert({ id: '11111111-1111-4111-8111-111111111111', name: 'Existing Operator', kind: 'operator', timezone: 'UTC' });
    expect(await seedDemo(db, pino({ level: 'silent' }))).toBe(false);
    expect(await db.getRepository(User).count()).toBe(0);
    await db.destroy();
  });
});
