import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { removeLeftoverUploads, uploadsDir } from '../../server/services/upload-scratch.js';

describe('left-over uploads', () => {
  let dataDir = '';
  afterEach(async () => {
    await rm(dataDir, { recursive: true, force: true });
  });

  it('when a killed server left an uploaded log and its chunk scratch file, then the next start removes both and keeps the rest of the data directory', async () => {
    dataDir = await mkdtemp(path.join(os.tmpdir(), 'driftline-uploads-'));
    mkdirSync(uploadsDir(dataDir));
    writeFileSync(path.join(uploadsDir(dataDir), '5d1c0a'), '{"t":"2026-11-03T08:15:02.120Z"}\n');
    writeFileSync(path.join(uploadsDir(dataDir), '5d1c0a.chunks'), Buffer.alloc(64));
    writeFileSync(path.join(dataDir, 'driftline.sqlite'), '');

    const removed = await removeLeftoverUploads(dataDir);

    expect(removed).toBe(2);
    expect(readdirSync(uploadsDir(dataDir))).toEqual([]);
    expect(existsSync(path.join(dataDir, 'driftline.sqlite'))).toBe(true);
  });

  it('when nothing was ever uploaded (no uploads folder), then nothing is removed and nothing is created', async () => {
    dataDir = await mkdtemp(path.join(os.tmpdir(), 'driftline-uploads-'));

    expect(await removeLeftoverUploads(dataDir)).toBe(0);
    expect(existsSync(uploadsDir(dataDir))).toBe(false);
  });
});
