import { describe, expect, it } from 'vitest';
import { AnswerCache } from '../../../server/services/answer-cache.js';

describe('AnswerCache', () => {
  it('when asked again with the same signature, then the remembered answer comes back without computing', async () => {
    const cache = new AnswerCache<number>(4);
    let computed = 0;
    const compute = async () => ++computed;
    expect(await cache.get('site-1', 'v1', compute)).toBe(1);
    expect(await cache.get('site-1', 'v1', compute)).toBe(1);
    expect(computed).toBe(1);
  });

  it('when the signature changed (the rows behind the answer changed), then it computes anew', async () => {
    const cache = new AnswerCache<string>(4);
    expect(await cache.get('site-1', 'rows:3', async () => 'three rows')).toBe('three rows');
    expect(await cache.get('site-1', 'rows:4', async () => 'four rows')).toBe('four rows');
    expect(await cache.get('site-1', 'rows:4', async () => 'not asked')).toBe('four rows');
  });

  it('when two requests ask at the same moment, then they share one computation', async () => {
    const cache = new AnswerCache<number>(4);
    let computed = 0;
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    const compute = async () => {
      computed++;
      await gate;
      return 42;
    };
    const both = Promise.all([cache.get('k', 's', compute), cache.get('k', 's', compute)]);
    release();
    expect(await both).toEqual([42, 42]);
    expect(computed).toBe(1);
  });

  it('when a computation fails, then the failure is not remembered and the next request computes again', async () => {
    const cache = new AnswerCache<number>(4);
    await expect(cache.get('k', 's', async () => Promise.reject(new Error('database gone')))).rejects.toThrow('database gone');
    expect(await cache.get('k', 's', async () => 7)).toBe(7);
  });

  it('when more keys than its size are asked for, then the least recently used leaves first', async () => {
    const cache = new AnswerCache<string>(2);
    await cache.get('a', '', async () => 'a1');
    await cache.get('b', '', async () => 'b1');
    await cache.get('a', '', async () => 'a2'); // a is now the most recently used
    await cache.get('c', '', async () => 'c1'); // b leaves
    expect(cache.size).toBe(2);
    expect(await cache.get('a', '', async () => 'a3')).toBe('a1');
    expect(await cache.get('b', '', async () => 'b2')).toBe('b2');
  });
});
