import { describe, expect, it } from 'vitest';
import { squareMetres } from '../../../../../src/components/maps/figures.js';
import { compareCandidates, DIFF_CLASS_ROWS, defaultCompareWith, rgbaCss, versionName, type VersionRef } from '../../../../../src/components/maps/map-diff.js';

function version(n: number, status: VersionRef['status'], kind: VersionRef['kind'] = 'floor'): VersionRef {
  return { id: `${kind}-${n}`, version: n, kind, label: '', status };
}

describe('compareCandidates / defaultCompareWith', () => {
  const v1 = version(1, 'archived');
  const v2 = version(2, 'active');
  const v3 = version(3, 'draft');
  const station = version(1, 'draft', 'station');
  const all = [v3, v2, v1, station];

  it('when a draft is selected, then it can be compared with every other floor version, newest first, and the active one comes first by default', () => {
    expect(compareCandidates(all, v3).map((v) => v.id)).toEqual(['floor-2', 'floor-1']);
    expect(defaultCompareWith(all, v3)?.id).toBe('floor-2');
  });

  it('when the active version is selected, then the default is the newest version before it (what it replaced)', () => {
    expect(defaultCompareWith(all, v2)?.id).toBe('floor-1');
  });

  it('when the active version is the oldest, then the default is the newest other', () => {
    expect(defaultCompareWith([version(2, 'draft'), version(1, 'active')], version(1, 'active'))?.id).toBe('floor-2');
  });

  it('when the site has a single floor version, then there is nothing to compare with', () => {
    expect(compareCandidates([v2, station], v2)).toEqual([]);
    expect(defaultCompareWith([v2, station], v2)).toBeNull();
  });
});

describe('wording and colours', () => {
  it('when colours are written for CSS, then alpha bytes become a 0–1 fraction', () => {
    expect(rgbaCss([0xe3, 0x8b, 0x1b, 255])).toBe('rgba(227, 139, 27, 1)');
    expect(rgbaCss([0, 0, 0, 51])).toBe('rgba(0, 0, 0, 0.2)');
  });

  it('when the classes are listed, then structure added and removed come first and each meaning names both versions', () => {
    expect(DIFF_CLASS_ROWS.map((r) => r.key)).toEqual(['added', 'removed', 'revealed', 'hidden']);
    expect(DIFF_CLASS_ROWS[0].meaning(3, 5)).toBe('occupied in v5, free or unknown in v3');
    // Amber #e38b1b for new structure (DESIGN.md §5), opaque.
    expect(DIFF_CLASS_ROWS[0].colour).toBe('rgba(227, 139, 27, 1)');
  });

  it('when a version is named, then its status and label follow its number', () => {
    expect(versionName({ version: 4, status: 'active', label: 'After the rack move' })).toBe('version 4 (active) · After the rack move');
    expect(versionName({ version: 5, status: 'draft', label: '' })).toBe('version 5 (draft)');
  });

  it('when areas are formatted, then small ones keep two decimals and large ones none', () => {
    expect(squareMetres(0.06)).toBe('0.06 m²');
    expect(squareMetres(0)).toBe('0.00 m²');
    expect(squareMetres(12.44)).toBe('12.4 m²');
    expect(squareMetres(1240.4)).toBe('1,240 m²');
  });
});
