import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { gzipSync } from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { lineLengthGuard, readLogHead } from '../../../../server/services/log-precheck.js';

const dir = mkdtempSync(path.join(os.tmpdir(), 'driftline-log-head-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let n = 0;
function file(content: Buffer | string) {
  const p = path.join(dir, `log-${n++}`);
  writeFileSync(p, content);
  return p;
}

/** Pushes `chunks` through a guard of `max` bytes; returns the bytes out, or the error's message. */
async function guarded(chunks: string[], max: number): Promise<string> {
  let out = '';
  try {
    await pipeline(Readable.from(chunks.map((c) => Buffer.from(c))), lineLengthGuard(max), async (source: AsyncIterable<Buffer>) => {
      for await (const chunk of source) out += chunk.toString();
    });
    return out;
  } catch (e) {
    return (e as Error).message;
  }
}

describe('log head', () => {
  it('when a small log is read, then all its lines come back without line ends and it is complete', async () => {
    const head = await readLogHead(file('a\r\nb\n\nc'), false, 1024);
    expect(head).toEqual({ lines: ['a', 'b', '', 'c'], complete: true });
  });

  it('when a log is longer than the head, then only whole lines inside the head come back', async () => {
    // 10 bytes of head: "0123\n5678\n" holds two lines, the third starts after it.
    const head = await readLogHead(file('0123\n5678\nabcdef\n'), false, 10);
    expect(head).toEqual({ lines: ['0123', '5678'], complete: false });
    const cut = await readLogHead(file('0123\n5678\nabcdef\n'), false, 12);
    expect(cut).toEqual({ lines: ['0123', '5678'], complete: false });
  });

  it('when a gzip log is read, then its unpacked lines come back', async () => {
    const head = await readLogHead(file(gzipSync('one\ntwo\n')), true, 1024);
    expect(head).toEqual({ lines: ['one', 'two', ''], complete: true });
  });

  it('when the gzip is damaged or cut, then 400 says it could not be unpacked', async () => {
    const cut = gzipSync('one\ntwo\n'.repeat(100)).subarray(0, 20);
    await expect(readLogHead(file(cut), true, 1024)).rejects.toMatchObject({ status: 400, code: 'invalid_gzip' });
  });

  it('when the first line runs past the head, then 422 says line 1 is too long', async () => {
    await expect(readLogHead(file('x'.repeat(50)), false, 10)).rejects.toMatchObject({ status: 422, code: 'line_too_long', message: expect.stringMatching(/^Line 1 of the log is longer than/) });
  });
});

describe('line length guard', () => {
  it('when every line is at most the limit, then the bytes pass unchanged, across chunk borders', async () => {
    expect(await guarded(['abc', 'de\nfghij', '\n', 'klmno\n'], 5)).toBe('abcde\nfghij\nklmno\n');
  });

  it('when a line grows past the limit inside one chunk, then the stream fails naming that line', async () => {
    expect(await guarded(['ok\nabcdef\n'], 5)).toMatch(/^Line 2 of the log is longer than/);
  });

  it('when a line grows past the limit across chunks without a line end, then the stream fails naming that line', async () => {
    expect(await guarded(['ok\nok\nabc', 'def', 'ghi'], 5)).toMatch(/^Line 3 of the log is longer than/);
  });
});
