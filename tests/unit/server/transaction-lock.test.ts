import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../../server/data-source.js';
import { Organization } from '../../../server/entities/index.js';

const org = (n: number) => ({ id: `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`, name: `Org ${n}`, kind: 'customer' as const, timezone: 'UTC' });
const tick = () => new Promise((r) => setTimeout(r, 5));

describe('transaction lock', () => {
  it('when one transaction rolls back while another request writes, then the other write survives', async () => {
    const db = await openDatabase({ database: ':memory:' });
    const failing = db.transaction(async (m) => {
      await m.insert(Organization, org(1));
      await tick(); // give the other request a chance to run while this transaction is open
      throw new Error('boom');
    });
    const plain = (async () => {
      await tick();
      await db.getRepository(Organization).insert(org(2));
    })();
    await expect(failing).rejects.toThrow('boom');
    await plain;
    expect((await db.getRepository(Organization).find()).map((o) => o.name)).toEqual(['Org 2']);
    await db.destroy();
  });

  it('when two transactions run at once and one fails, then the other commits whole', async () => {
    const db = await openDatabase({ database: ':memory:' });
    const a = db.transaction(async (m) => {
      await m.insert(Organization, org(3));
      await tick();
      await m.insert(Organization, org(4));
    });
    const b = db.transaction(async (m) => {
      await m.insert(Organization, org(5));
      await tick();
      throw new Error('fails');
    });
    await a;
    await expect(b).rejects.toThrow('fails');
    expect((await db.getRepository(Organization).find({ order: { name: 'ASC' } })).map((o) => o.name)).toEqual(['Org 3', 'Org 4']);
    await db.destroy();
  });
});
