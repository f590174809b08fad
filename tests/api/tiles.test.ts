import { PNG } from 'pngjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roomMap } from './helpers/fixtures.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

describe('map version grid tiles', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let owen: string;
  let ambergateMap: string;
  let corvaneMap: string;
  const tilePath = (site: string, version: string, z: number | string, x: number | string, y: number | string) => `/api/sites/${site}/map-versions/${version}/tiles/${z}/${x}/${y}.png`;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
    const upload = async (siteId: string) => {
      const { pgm, yaml } = roomMap();
      return (await t.services.mapVersions.upload(ids.admin, siteId, { kind: 'floor', label: 'tile room', image: { originalname: 'room.pgm', buffer: pgm }, metadataFile: { originalname: 'room.yaml', buffer: yaml } })).id;
    };
    ambergateMap = await upload(ids.ambergateSite);
    corvaneMap = await upload(ids.corvaneSite);
  });
  afterAll(() => t.close());

  it('when a viewer asks for the zoom-0 tile, then a 256 × 256 PNG shows the walled room and is transparent past it', async () => {
    const res = await request(t.app).get(tilePath(ids.ambergateSite, ambergateMap, 0, 0, 0)).set('Cookie', owen);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('image/png');
    // The ETag names version, tile style (TILE_STYLE in shared/render/palette.ts) and tile.
    expect(res.headers.etag).toBe(`"${ambergateMap}-s1-0-0-0"`);
    expect(res.headers['cache-control']).toBe('private, max-age=31536000, immutable');
    // Decoded with pngjs@7 (the reference PNG reader), not with our encoder.
    const png = PNG.sync.read(res.body as Buffer);
    expect([png.width, png.height]).toEqual([256, 256]);
    const at = (x: number, y: number) => Array.from(png.data.subarray((y * 256 + x) * 4, (y * 256 + x) * 4 + 4));
    // The 40 × 40 room fits in 512 px, so zoom 0 is one pixel per cell; its border is wall.
    expect(at(0, 0)).toEqual([0x1e, 0x2a, 0x3f, 255]); // structure #1e2a3f (DESIGN.md §5)
    expect(at(5, 5)).toEqual([0xf6, 0xf3, 0xea, 255]); // free #f6f3ea (DESIGN.md §5)
    expect(at(40, 0)[3]).toBe(0);
    expect(at(0, 40)[3]).toBe(0);
  });

  it('when the client already holds the tile, then 304 with no body', async () => {
    const res = await request(t.app).get(tilePath(ids.ambergateSite, ambergateMap, 2, 0, 0)).set('Cookie', owen).set('If-None-Match', `"${ambergateMap}-s1-2-0-0"`);
    expect(res.status).toBe(304);
    expect(res.headers.etag).toBe(`"${ambergateMap}-s1-2-0-0"`);
    expect(res.body).toEqual({});
    const stale = await request(t.app).get(tilePath(ids.ambergateSite, ambergateMap, 2, 0, 0)).set('Cookie', owen).set('If-None-Match', `"${ambergateMap}-s1-1-0-0"`);
    expect(stale.status).toBe(200);
  });

  it('when zoom or tile index is negative, not whole or past the map, then 400 says so', async () => {
    for (const [z, x, y] of [[-1, 0, 0], [0, 1, 0], [0, 0, 1], [3, 0, 0], ['0.5', 0, 0], [0, 'a', 0]]) {
      const res = await request(t.app).get(tilePath(ids.ambergateSite, ambergateMap, z, x, y)).set('Cookie', owen);
      expect(res.status, `${z}/${x}/${y}`).toBe(400);
      expect(res.body.error.message).toMatch(/whole number|outside this map version|deepest zoom/);
    }
  });

  it('when a customer user asks for another organization’s tile, then 404 even with a matching If-None-Match', async () => {
    const own = await request(t.app).get(tilePath(ids.corvaneSite, corvaneMap, 0, 0, 0)).set('Cookie', owen).set('If-None-Match', `"${corvaneMap}-s1-0-0-0"`);
    expect(own.status).toBe(404);
    const mixed = await request(t.app).get(tilePath(ids.ambergateSite, corvaneMap, 0, 0, 0)).set('Cookie', owen);
    expect(mixed.status).toBe(404);
  });
});
