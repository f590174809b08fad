/**
 * Remembers computed answers by key, each with the signature of the data it was computed from: a
 * caller asks with the current signature (a few cheap figures of the rows behind the answer) and
 * gets the remembered answer only while that signature is unchanged, so a write that changes the
 * rows changes the answer at once. Requests that ask at the same moment share one computation.
 * At most `maxEntries` keys stay, least recently used leave first.
 */
export class AnswerCache<T> {
  private readonly entries = new Map<string, { signature: string; value: Promise<T> }>();

  constructor(private readonly maxEntries: number) {}

  /** The answer for `key` computed from data with `signature`, computing it when none is remembered for that signature. */
  get(key: string, signature: string, compute: () => Promise<T>): Promise<T> {
    const hit = this.entries.get(key);
    if (hit && hit.signature === signature) {
      // Re-inserting keeps the map in least-recently-used order.
      this.entries.delete(key);
      this.entries.set(key, hit);
      return hit.value;
    }
    const value = compute();
    const entry = { signature, value };
    this.entries.delete(key);
    this.entries.set(key, entry);
    while (this.entries.size > this.maxEntries) this.entries.delete(this.entries.keys().next().value!);
    // A failed computation is not remembered: the next request tries again.
    value.catch(() => {
      if (this.entries.get(key) === entry) this.entries.delete(key);
    });
    return value;
  }

  /** Number of remembered answers. */
  get size(): number {
    return this.entries.size;
  }
}
