import { PNG } from 'pngjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatMapMetadata } from '../../shared/grid/map-metadata.js';
import { encodePgm } from '../../shared/grid/pgm.js';
import { AuditEvent } from '../../server/entities/index.js';
import { createTestApp, demoIds, signIn, type TestApp } from './helpers/test-app.js';

type State = 'free' | 'occupied' | 'unknown';
// Grey values in the PGM convention with the default thresholds (negate 0, occupied above 0.65,
// free below 0.196): p = (255 − v) / 255, so 0 → 1 occupied, 254 → 0.004 free, 205 → 0.196 unknown.
const GREY: Record<State, number> = { occupied: 0, free: 254, unknown: 205 };
const SIDE = 40;
const RES = 0.05;

/** A hand-made 40 × 40-cell map at 0.05 m: the state of cell (i, j) with j from the bottom; image row 0 is j = 39. */
function mapFiles(name: string, stateOf: (i: number, j: number) => State, origin: [number, number, number] = [0, 0, 0], resolution = RES) {
  const pixels = new Uint16Array(SIDE * SIDE);
  for (let j = 0; j < SIDE; j++) for (let i = 0; i < SIDE; i++) pixels[(SIDE - 1 - j) * SIDE + i] = GREY[stateOf(i, j)];
  const pgm = Buffer.from(encodePgm({ width: SIDE, height: SIDE, maxval: 255, pixels }));
  const yaml = Buffer.from(formatMapMetadata({ image: `${name}.pgm`, resolution, origin, negate: 0, occupiedThresh: 0.65, freeThresh: 0.196, mode: 'trinary' }));
  return { image: { originalname: `${name}.pgm`, buffer: pgm }, metadataFile: { originalname: `${name}.yaml`, buffer: yaml } };
}

const ring = (i: number, j: number) => i === 0 || j === 0 || i === SIDE - 1 || j === SIDE - 1;
const inBox = (i: number, j: number, i0: number, i1: number, j0: number, j1: number) => i >= i0 && i < i1 && j >= j0 && j < j1;

// Base: a walled room with an unknown patch of 4 × 5 cells at i 20–23, j 20–24.
const baseState = (i: number, j: number): State => (ring(i, j) ? 'occupied' : inBox(i, j, 20, 24, 20, 25) ? 'unknown' : 'free');
// Other, same geometry: 10 cells of the top wall gone (i 10–19), a 10 × 2 rack at i 5–14, j 5–6,
// the unknown patch mapped (free, its bottom row j = 20 occupied) and an unknown strip of 8 × 5 at i 30–37, j 5–9.
function otherState(i: number, j: number): State {
  if (j === SIDE - 1 && i >= 10 && i < 20) return 'free';
  if (ring(i, j)) return 'occupied';
  if (inBox(i, j, 5, 15, 5, 7)) return 'occupied';
  if (inBox(i, j, 20, 24, 20, 21)) return 'occupied';
  if (inBox(i, j, 30, 38, 5, 10)) return 'unknown';
  return 'free';
}

describe('map version differences', () => {
  let t: TestApp;
  let ids: Awaited<ReturnType<typeof demoIds>>;
  let owen: string;
  let tomas: string;
  let base: string;
  let other: string;
  let shifted: string;
  let station: string;
  let corvaneMap: string;
  let corvaneOther: string;
  const diffPath = (site: string, version: string, query: string) => `/api/sites/${site}/map-versions/${version}/diff${query}`;
  const tilePath = (site: string, version: string, z: number | string, x: number | string, y: number | string, query: string) => `/api/sites/${site}/map-versions/${version}/diff-tiles/${z}/${x}/${y}.png${query}`;

  beforeAll(async () => {
    t = await createTestApp();
    ids = await demoIds(t.dataSource);
    owen = await signIn(t.app, 'owen.viewer@ambergate.example', 'demo-viewer-2026');
    tomas = await signIn(t.app, 'tomas.mapper@kestrelway.example', 'demo-mapper-2026');
    const upload = async (siteId: string, files: ReturnType<typeof mapFiles>, kind: 'floor' | 'station' = 'floor') => (await t.services.mapVersions.upload(ids.admin, siteId, { kind, label: '', ...files })).id;
    base = await upload(ids.ambergateSite, mapFiles('base', baseState));
    other = await upload(ids.ambergateSite, mapFiles('other', otherState));
    // The base's image again, its origin 0.5 m (10 cells) to the right.
    shifted = await upload(ids.ambergateSite, mapFiles('shifted', baseState, [0.5, 0, 0]));
    station = await upload(ids.ambergateSite, mapFiles('station', baseState, [0, 0, 0], 0.002), 'station');
    corvaneMap = await upload(ids.corvaneSite, mapFiles('base', baseState));
    corvaneOther = await upload(ids.corvaneSite, mapFiles('other', otherState));
  });
  afterAll(() => t.close());

  it('when a viewer compares two versions of one geometry, then the cells and m² of each class are counted on the base', async () => {
    const res = await request(t.app).get(diffPath(ids.ambergateSite, base, `?against=${other}`)).set('Cookie', owen);

    expect(res.status).toBe(200);
    // Hand-counted from the two drawings: added 20 (rack, free → occupied) + 4 (unknown → occupied);
    // removed 10 (top wall, occupied → free); revealed 20 (the whole 4 × 5 patch); hidden 40 (8 × 5
    // strip, free → unknown). Areas: cells × 0.05² = cells × 0.0025 m².
    expect(res.body.diff).toEqual({
      base: { id: base, version: 1 },
      other: { id: other, version: 2 },
      cells: { added: 24, removed: 10, revealed: 20, hidden: 40 },
      areasM2: { added: 0.06, removed: 0.025, revealed: 0.05, hidden: 0.1 },
      resolution: 0.05,
      comparedOn: 'base',
    });
  });

  it('when the other version’s origin lies 10 cells to the right, then base cell i meets its cell i − 10 and the strip past it counts as unknown', async () => {
    const res = await request(t.app).get(diffPath(ids.ambergateSite, base, `?against=${shifted}`)).set('Cookie', owen);

    expect(res.status).toBe(200);
    // Hand-counted: base columns 0–9 lie outside the shifted grid: 10 × 40 known cells hidden. The
    // shifted left wall (its i = 0) lands on base i = 10, rows 1–38: 38 added; the base right wall
    // (i = 39, rows 1–38) meets the shifted free i = 29: 38 removed; the base patch (i 20–23) meets
    // shifted free i 10–13: 20 revealed; the shifted patch lands on base free i 30–33: 20 more hidden.
    expect(res.body.diff.cells).toEqual({ added: 38, removed: 38, revealed: 20, hidden: 420 });
    expect(res.body.diff.areasM2).toEqual({ added: 0.095, removed: 0.095, revealed: 0.05, hidden: 1.05 });
  });

  it('when the comparison runs the other way, then it counts on the other’s cells, and structure that turned unknown is hidden, not removed', async () => {
    const res = await request(t.app).get(diffPath(ids.ambergateSite, other, `?against=${base}`)).set('Cookie', owen);

    expect(res.status).toBe(200);
    // Reverse of the first case, counted on the other's cells: the rack occupied → free (20 removed);
    // the top wall gap free → occupied (10 added); the strip unknown → free (40 revealed); the patch,
    // now known (16 free, 4 occupied), → unknown (20 hidden: occupied → unknown is hidden, not removed).
    expect(res.body.diff.cells).toEqual({ added: 10, removed: 20, revealed: 40, hidden: 20 });
  });

  it('when the zoom-0 diff tile is asked, then changed cells carry their colours, the rest is transparent, and it is cached like a grid tile', async () => {
    const res = await request(t.app).get(tilePath(ids.ambergateSite, base, 0, 0, 0, `?against=${other}&style=1`)).set('Cookie', owen);

    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('image/png');
    // The ETag names both versions, the tile style (TILE_STYLE in shared/render/palette.ts) and the tile.
    expect(res.headers.etag).toBe(`"diff-${base}-${other}-s1-0-0-0"`);
    expect(res.headers['cache-control']).toBe('private, max-age=31536000, immutable');
    // Decoded with pngjs@7 (the reference PNG reader), not with our encoder.
    const png = PNG.sync.read(res.body as Buffer);
    expect([png.width, png.height]).toEqual([256, 256]);
    // 40 × 40 cells fit in 512 px, so zoom 0 is one pixel per cell; cell (i, j) is pixel (i, 39 − j).
    const at = (i: number, j: number) => Array.from(png.data.subarray(((SIDE - 1 - j) * 256 + i) * 4, ((SIDE - 1 - j) * 256 + i) * 4 + 4));
    expect(at(5, 5)).toEqual([0xe3, 0x8b, 0x1b, 255]); // rack: added, amber #e38b1b (issue contract, DESIGN.md §5)
    expect(at(21, 20)).toEqual([0xe3, 0x8b, 0x1b, 255]); // unknown → occupied: shown as added
    expect(at(12, 39)).toEqual([0x6a, 0x4b, 0xd6, 255]); // top wall gone: removed, violet #6a4bd6
    expect(at(21, 22)).toEqual([0x7f, 0xcf, 0xc4, 160]); // patch now free: revealed, pale teal (DIFF_COLOURS)
    expect(at(31, 7)).toEqual([0x5b, 0x68, 0x7e, 150]); // strip now unknown: hidden, slate (DIFF_COLOURS)
    expect(at(2, 2)[3]).toBe(0); // unchanged free floor
    expect(at(0, 0)[3]).toBe(0); // unchanged wall
    expect(Array.from(png.data.subarray((100 * 256 + 100) * 4, (100 * 256 + 100) * 4 + 4))).toEqual([0, 0, 0, 0]); // past the map

    const again = await request(t.app).get(tilePath(ids.ambergateSite, base, 0, 0, 0, `?against=${other}&style=1`)).set('Cookie', owen).set('If-None-Match', res.headers.etag);
    expect(again.status).toBe(304);
    // The ETag of another pair never matches: the reverse pair has its own.
    const reverse = await request(t.app).get(tilePath(ids.ambergateSite, other, 0, 0, 0, `?against=${base}`)).set('Cookie', owen).set('If-None-Match', res.headers.etag);
    expect(reverse.status).toBe(200);
    expect(reverse.headers.etag).toBe(`"diff-${other}-${base}-s1-0-0-0"`);
  });

  it('when many tiles of a pair are asked at once, then all answer and agree with the figures', async () => {
    // Zoom 2 on a 40 × 40 map is 4 px per cell: 160 px, one tile; zooms 0–2 together ask the pair's difference three times at once.
    const results = await Promise.all([0, 1, 2].map((z) => request(t.app).get(tilePath(ids.ambergateSite, base, z, 0, 0, `?against=${shifted}`)).set('Cookie', owen)));
    expect(results.map((r) => r.status)).toEqual([200, 200, 200]);
    const png = PNG.sync.read(results[2].body as Buffer);
    // At 4 px per cell, base cell (10, 5) (the shifted left wall, added) is pixels 40–43 × (39 − 5)·4 = 136–139.
    expect(Array.from(png.data.subarray((136 * 256 + 40) * 4, (136 * 256 + 40) * 4 + 4))).toEqual([0xe3, 0x8b, 0x1b, 255]);
  });

  it('when the request is malformed, then 400 says what is wrong', async () => {
    const cases: Array<[string, RegExp]> = [
      [diffPath(ids.ambergateSite, base, ''), /against: name the version to compare with/],
      [diffPath(ids.ambergateSite, base, '?against=v2'), /against: must be a valid id/],
      [diffPath(ids.ambergateSite, base, `?against=${base}`), /not with itself/],
      [diffPath(ids.ambergateSite, base, `?against=${station}`), /Station model version 1 is not a floor map; differences are shown between floor maps only/],
      [diffPath(ids.ambergateSite, station, `?against=${base}`), /Station model version 1 is not a floor map/],
      [diffPath(ids.ambergateSite, base, `?against=${other}&colour=red`), /not valid/],
      [tilePath(ids.ambergateSite, base, 3, 0, 0, `?against=${other}`), /deepest zoom 2/],
      [tilePath(ids.ambergateSite, base, 0, 1, 0, `?against=${other}`), /outside this map version/],
      [tilePath(ids.ambergateSite, base, -1, 0, 0, `?against=${other}`), /whole number/],
      [tilePath(ids.ambergateSite, base, 0, 0, 0, `?against=${other}&style=0`), /style/],
      [tilePath(ids.ambergateSite, base, 0, 0, 0, ''), /against/],
    ];
    for (const [path, message] of cases) {
      const res = await request(t.app).get(path).set('Cookie', owen);
      expect(res.status, path).toBe(400);
      expect(res.body.error.message, path).toMatch(message);
    }
  });

  it('when a version is unknown or belongs to another organization, then 404, also for tiles with a matching If-None-Match', async () => {
    const cases = [
      diffPath(ids.ambergateSite, base, `?against=${crypto.randomUUID()}`),
      diffPath(ids.corvaneSite, corvaneMap, `?against=${corvaneOther}`),
      diffPath(ids.ambergateSite, corvaneMap, `?against=${base}`),
      diffPath(ids.ambergateSite, base, `?against=${corvaneMap}`),
      // Another organization's version compared with itself: 404 comes before the 400 for the same version.
      diffPath(ids.corvaneSite, corvaneMap, `?against=${corvaneMap}`),
    ];
    for (const path of cases) {
      const res = await request(t.app).get(path).set('Cookie', owen);
      expect(res.status, path).toBe(404);
    }
    const tile = await request(t.app).get(tilePath(ids.corvaneSite, corvaneMap, 0, 0, 0, `?against=${corvaneOther}`)).set('Cookie', owen).set('If-None-Match', `"diff-${corvaneMap}-${corvaneOther}-s1-0-0-0"`);
    expect(tile.status).toBe(404);
    // The operator's mapper sees every organization's sites.
    const mapper = await request(t.app).get(diffPath(ids.corvaneSite, corvaneMap, `?against=${corvaneOther}`)).set('Cookie', tomas);
    expect(mapper.status).toBe(200);
    expect(mapper.body.diff.cells).toEqual({ added: 24, removed: 10, revealed: 20, hidden: 40 });
  });

  it('when an archived version is activated again, then it is active, the other one archived, and the audit names the roll back', async () => {
    const activate = (id: string) => request(t.app).post(`/api/sites/${ids.ambergateSite}/map-versions/${id}/activate`).set('Cookie', tomas).send({});
    expect((await activate(base)).status).toBe(200);
    expect((await activate(other)).status).toBe(200);

    const back = await activate(base);

    expect(back.status).toBe(200);
    expect(back.body.mapVersion).toMatchObject({ id: base, status: 'active' });
    const otherNow = await request(t.app).get(`/api/sites/${ids.ambergateSite}/map-versions/${other}`).set('Cookie', tomas);
    expect(otherNow.body.mapVersion.status).toBe('archived');
    const events = await t.dataSource.getRepository(AuditEvent).find({ where: { action: 'map.activate', targetId: base }, order: { at: 'ASC' } });
    expect(events.map((e) => e.summary)).toEqual([
      expect.stringMatching(/activated floor map version 1 of Fennick Cross DC\.$/),
      expect.stringMatching(/activated floor map version 1 of Fennick Cross DC again \(roll back from version 2\)\.$/),
    ]);
    const forward = await t.dataSource.getRepository(AuditEvent).findOneByOrFail({ action: 'map.activate', targetId: other });
    expect(forward.summary).toMatch(/version 2 of Fennick Cross DC in place of version 1\.$/);
  });
});
