import { describe, expect, it } from 'vitest';
import { GridFormatError } from '../../../../shared/grid/errors.js';
import { checkImageName, formatMapMetadata, parseMapMetadata } from '../../../../shared/grid/map-metadata.js';
import type { MapMetadata } from '../../../../shared/types/grid.js';

// Invented demo map of our own scenario (Harbourlight Logistics, hall B).
const FULL = `image: harbourlight-hall-b.pgm
resolution: 0.05
origin: [-12.5, -4.25, 0.0]
negate: 0
occupied_thresh: 0.65
free_thresh: 0.196
mode: trinary
`;

function messageOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(GridFormatError);
    return (e as Error).message;
  }
  throw new Error('expected a GridFormatError');
}

describe('parseMapMetadata', () => {
  it('when every field is given, then each is read into MapMetadata', () => {
    // Act
    const meta = parseMapMetadata(FULL);

    // Assert
    expect(meta).toEqual({
      image: 'harbourlight-hall-b.pgm',
      resolution: 0.05,
      origin: [-12.5, -4.25, 0],
      negate: 0,
      occupiedThresh: 0.65,
      freeThresh: 0.196,
      mode: 'trinary',
    });
  });

  it('when only image, resolution and origin are given, then the convention defaults apply (common practice: negate 0, occupied 0.65, free 0.196, trinary)', () => {
    // Arrange: defaults of the PGM + YAML map convention, common practice (from memory).
    const text = 'image: a.pgm\nresolution: 0.1\norigin: [0, 0, 0]\n';

    // Act
    const meta = parseMapMetadata(text);

    // Assert
    expect([meta.negate, meta.occupiedThresh, meta.freeThresh, meta.mode]).toEqual([0, 0.65, 0.196, 'trinary']);
  });

  it('when the YAML uses block style, comments and extra keys, then it is still read', () => {
    // Arrange
    const text = `# hall B, second mapping run
image: "hall b.pgm"
resolution: 0.025
origin:
  - 1.5
  - -2
  - 1.5707963
negate: 1
mode: scale
surveyed_by: ines.okafor@harbourlight.example
`;

    // Act
    const meta = parseMapMetadata(text);

    // Assert
    expect(meta.image).toBe('hall b.pgm');
    expect(meta.origin).toEqual([1.5, -2, 1.5707963]);
    expect([meta.negate, meta.mode]).toEqual([1, 'scale']);
  });

  it('when resolution is 0, negative, text or missing, then the message names "resolution"', () => {
    const base = 'image: a.pgm\norigin: [0, 0, 0]\n';
    expect(messageOf(() => parseMapMetadata(`${base}resolution: 0\n`))).toMatch(/"resolution" must be greater than 0/);
    expect(messageOf(() => parseMapMetadata(`${base}resolution: -0.05\n`))).toMatch(/"resolution" must be greater than 0/);
    expect(messageOf(() => parseMapMetadata(`${base}resolution: "0.05"\n`))).toMatch(/"resolution" must be a finite number/);
    expect(messageOf(() => parseMapMetadata(`${base}resolution: .inf\n`))).toMatch(/"resolution" must be a finite number/);
    expect(messageOf(() => parseMapMetadata(base))).toMatch(/"resolution"/);
  });

  it('when origin is not three finite numbers, then the message names the origin', () => {
    const base = 'image: a.pgm\nresolution: 0.05\n';
    expect(messageOf(() => parseMapMetadata(`${base}origin: [1, 2]\n`))).toMatch(/"origin" must be a list of three numbers/);
    expect(messageOf(() => parseMapMetadata(`${base}origin: [1, 2, 3, 4]\n`))).toMatch(/"origin"/);
    expect(messageOf(() => parseMapMetadata(`${base}origin: [1, north, 0]\n`))).toMatch(/"origin y"/);
    expect(messageOf(() => parseMapMetadata(`${base}origin: [1, 2, .nan]\n`))).toMatch(/"origin yaw"/);
    expect(messageOf(() => parseMapMetadata(base))).toMatch(/"origin"/);
  });

  it('when a threshold is outside [0, 1] or free is not below occupied, then the message names the threshold', () => {
    const base = 'image: a.pgm\nresolution: 0.05\norigin: [0, 0, 0]\n';
    expect(messageOf(() => parseMapMetadata(`${base}occupied_thresh: 1.2\n`))).toMatch(/"occupied_thresh" must lie between 0 and 1/);
    expect(messageOf(() => parseMapMetadata(`${base}free_thresh: -0.1\n`))).toMatch(/"free_thresh" must lie between 0 and 1/);
    expect(messageOf(() => parseMapMetadata(`${base}free_thresh: 0.7\n`))).toMatch(/"free_thresh" must be smaller than its "occupied_thresh"/);
    expect(messageOf(() => parseMapMetadata(`${base}free_thresh: 0.65\n`))).toMatch(/smaller than/);
  });

  it('when negate, mode or image are wrong, then the message names the field', () => {
    const base = 'resolution: 0.05\norigin: [0, 0, 0]\n';
    expect(messageOf(() => parseMapMetadata(`image: a.pgm\n${base}negate: 2\n`))).toMatch(/"negate" must be 0 or 1/);
    expect(messageOf(() => parseMapMetadata(`image: a.pgm\n${base}mode: colour\n`))).toMatch(/"mode" must be trinary, scale or raw/);
    expect(messageOf(() => parseMapMetadata(base))).toMatch(/"image"/);
    expect(messageOf(() => parseMapMetadata(`image: "  "\n${base}`))).toMatch(/"image"/);
  });

  it('when the text is not YAML or not a mapping, then the message says so', () => {
    expect(messageOf(() => parseMapMetadata('image: [a.pgm\nresolution: 0.05'))).toMatch(/^The map metadata is not valid YAML \(.*line 2.*\)\.$/);
    expect(messageOf(() => parseMapMetadata(''))).toMatch(/must be a YAML mapping/);
    expect(messageOf(() => parseMapMetadata('- a\n- b\n'))).toMatch(/must be a YAML mapping/);
  });

  it('when the text is longer than 8 KB or nests more than 8 deep, then it is refused before the YAML parser reads it', () => {
    // A million nested brackets kept the parser busy for half a minute; these answer at once.
    expect(messageOf(() => parseMapMetadata(`${FULL}#${'x'.repeat(8 * 1024)}\n`))).toMatch(/^The map metadata file holds 8,3\d\d characters; .* at most 8,192 are accepted\.$/);
    expect(messageOf(() => parseMapMetadata(`${FULL}extra: ${'['.repeat(9)}${']'.repeat(9)}\n`))).toBe("The map metadata nests lists or mappings more than 8 deep; a map's metadata needs one level.");
    expect(messageOf(() => parseMapMetadata('['.repeat(1_000_000)))).toMatch(/at most 8,192 are accepted/);
  });

  it('when brackets stand in quotes or comments, then they do not count as nesting', () => {
    const text = `${FULL}note: "${'['.repeat(20)}"\n# ${'{'.repeat(20)}\n`;
    expect(parseMapMetadata(text).image).toBe('harbourlight-hall-b.pgm');
  });
});

describe('formatMapMetadata', () => {
  const meta: MapMetadata = {
    image: 'north dock: v2.pgm',
    resolution: 0.05,
    origin: [-3.2, 7.75, -0.5],
    negate: 1,
    occupiedThresh: 0.7,
    freeThresh: 0.2,
    mode: 'scale',
  };

  it('when formatting, then the convention keys appear in order with snake_case names', () => {
    // Act
    const text = formatMapMetadata(meta);

    // Assert
    expect(text.split('\n').map((l) => l.split(':')[0])).toEqual([
      'image', 'resolution', 'origin', 'negate', 'occupied_thresh', 'free_thresh', 'mode', '',
    ]);
    expect(text).toContain('origin: [-3.2, 7.75, -0.5]\n');
  });

  it('when formatting then parsing, then the metadata comes back unchanged, even with YAML-special characters in the image name', () => {
    // Act
    const back = parseMapMetadata(formatMapMetadata(meta));

    // Assert
    expect(back).toEqual(meta);
  });
});

describe('checkImageName', () => {
  const meta = parseMapMetadata(FULL);

  it('when the uploaded file has the named basename, then it is accepted whatever the folders', () => {
    expect(() => checkImageName(meta, 'harbourlight-hall-b.pgm')).not.toThrow();
    expect(() => checkImageName(meta, 'C:\\maps\\harbourlight-hall-b.pgm')).not.toThrow();
    expect(() => checkImageName({ ...meta, image: 'maps/harbourlight-hall-b.pgm' }, '/tmp/up/harbourlight-hall-b.pgm')).not.toThrow();
  });

  it('when the metadata names another image, then a GridFormatError names both files', () => {
    expect(messageOf(() => checkImageName(meta, 'hall-c.pgm'))).toBe(
      'The map metadata names the image "harbourlight-hall-b.pgm" but the uploaded image is "hall-c.pgm".',
    );
  });
});
