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

  it('when a read arrives after a waiting transaction, then it waits for that transaction: reads cannot keep a write out', async () => {
    const db = await openDatabase({ database: ':memory:' });
    const order: string[] = [];
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    // The first transaction holds the database while a read, a second transaction and another read arrive in that order.
    const first = db.transaction(async (m) => {
      await m.insert(Organization, org(7));
      await gate;
    });
    await tick();
    const earlyRead = db.query('SELECT 1').then(() => order.push('early read'));
    const second = db.transaction(async (m) => {
      await m.insert(Organization, org(8));
      order.push('second transaction');
    });
    const lateRead = db.query('SELECT 1').then(() => order.push('late read'));
    await tick();
    release();
    await Promise.all([first, earlyRead, second, lateRead]);
    expect(order).toEqual(['early read', 'second transaction', 'late read']);
    await db.destroy();
  });
});
