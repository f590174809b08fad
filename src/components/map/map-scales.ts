// Colour scales of the map's block layers (agreement heat and traffic): classed, sequential, one hue
// each, light for little and dark for much. Pure, so the legend, the canvas tiles and the tests share them.

/** One class of a sequential scale: its fill colour (CSS) and the words the legend shows for it. */
export interface ScaleClass {
  colour: string;
  label: string;
}

/**
 * Opacity the block layers draw with. Their pane multiplies onto the grid (MapCanvas), so structure
 * stays ink under any block and free floor takes the block's colour; the legend's swatches are
 * drawn the same way over paper, so a swatch matches a block on free floor.
 */
export const BLOCK_OPACITY = 0.5;

// Rust red, light to dark: six steps of one hue (product choice, not a published scale). Red reads
// as "look here", and it stays apart from the zone kinds' amber, violet and teal.
const HEAT_COLOURS = ['#f7e7e1', '#efc7b8', '#e39c83', '#d06e55', '#b24a33', '#8a2c1c'] as const;
// Slate blue, light to dark, for traffic: a second hue that cannot be mistaken for the heat layer.
const TRAFFIC_COLOURS = ['#e3ecf5', '#bcd2e8', '#8fb3d8', '#5f8ec3', '#3768a4', '#17457a'] as const;

/**
 * Agreement limits (shares 0–1) between the heat classes, best first. Product choice: 97 % and 90 %
 * are the default health band limits (good, watch), so a block darker than the 95–97 % step is
 * below what a healthy map explains; the steps above and below split the bands further.
 */
export const AGREEMENT_LIMITS: readonly number[] = [0.99, 0.97, 0.95, 0.9, 0.8];

/** Returns the heat class of an agreement share (0 = at least 99 %, 5 = below 80 %), or null without returns. */
export function agreementClass(agreement: number | null): number | null {
  if (agreement === null || !Number.isFinite(agreement)) return null;
  const k = AGREEMENT_LIMITS.findIndex((limit) => agreement >= limit);
  return k === -1 ? AGREEMENT_LIMITS.length : k;
}

/** Returns the heat scale's classes, lightest (best agreement) first, with their percentages in words. */
export function agreementScale(): ScaleClass[] {
  const pct = (share: number) => `${Math.round(share * 100)} %`;
  const last = AGREEMENT_LIMITS.length - 1;
  return HEAT_COLOURS.map((colour, k) => {
    if (k === 0) return { colour, label: `≥ ${pct(AGREEMENT_LIMITS[0])}` };
    if (k > last) return { colour, label: `< ${pct(AGREEMENT_LIMITS[last])}` };
    return { colour, label: `${Math.round(AGREEMENT_LIMITS[k] * 100)}–${pct(AGREEMENT_LIMITS[k - 1])}` };
  });
}

/** Returns the heat scale's limits in words for the ticks between its classes, best first ("99", "97", … "80"). */
export function agreementTicks(): string[] {
  return AGREEMENT_LIMITS.map((limit) => String(Math.round(limit * 100)));
}

/** Returns the heat colour of an agreement share, or null (draw nothing) without returns. */
export function agreementColour(agreement: number | null): string | null {
  const k = agreementClass(agreement);
  return k === null ? null : HEAT_COLOURS[k];
}

/**
 * Returns five ascending traffic limits (returns per m² per day) for a layer whose busiest block has
 * `max`: the largest numbers of the 1–2–5 series up to `max` (… 1, 2, 5, 10, 20, 50 …), so that each
 * class spans a factor of 2 to 2.5 and a heavy-tailed spread of traffic still uses every class. The
 * 1–2–5 series is common practice for instrument scales. Empty when nothing was counted.
 */
export function trafficLimits(max: number): number[] {
  if (!(max > 0) || !Number.isFinite(max)) return [];
  const steps = [1, 2, 5];
  let exponent = Math.floor(Math.log10(max));
  let index = steps.length - 1;
  // Start at the largest step not above max (log10 can land a hair off at exact powers of ten).
  while (steps[index] * 10 ** exponent > max * (1 + 1e-12)) {
    index--;
    if (index < 0) {
      index = steps.length - 1;
      exponent--;
    }
  }
  const limits: number[] = [];
  while (limits.length < 5) {
    limits.unshift(roundNice(steps[index] * 10 ** exponent));
    index--;
    if (index < 0) {
      index = steps.length - 1;
      exponent--;
    }
  }
  return limits;
}

/** Rounds away floating-point noise of 2 · 10^−3 and the like (0.0020000000000000005 → 0.002). */
function roundNice(value: number): number {
  return Number(value.toPrecision(6));
}

/** Returns the traffic class of a value against its limits (0 = below the first limit, 5 = at least the last), or null for no traffic. */
export function trafficClass(value: number, limits: readonly number[]): number | null {
  if (!(value > 0) || limits.length === 0) return null;
  let k = 0;
  while (k < limits.length && value >= limits[k]) k++;
  return k;
}

/** Returns the traffic colour of a value against its limits, or null (draw nothing) for none. */
export function trafficColour(value: number, limits: readonly number[]): string | null {
  const k = trafficClass(value, limits);
  return k === null ? null : TRAFFIC_COLOURS[k];
}

/** Returns a scale number in plain words: no more decimals than it needs ("0.05", "2", "1,000"). */
export function scaleNumber(value: number): string {
  if (value >= 1) return Math.round(value).toLocaleString('en-GB');
  return String(roundNice(value));
}

/** Returns the traffic scale's classes, lightest (least traffic) first, with their limits in words (unit not included). */
export function trafficScale(limits: readonly number[]): ScaleClass[] {
  if (limits.length === 0) return [];
  return TRAFFIC_COLOURS.map((colour, k) => {
    if (k === 0) return { colour, label: `< ${scaleNumber(limits[0])}` };
    if (k >= limits.length) return { colour, label: `≥ ${scaleNumber(limits[limits.length - 1])}` };
    return { colour, label: `${scaleNumber(limits[k - 1])}–${scaleNumber(limits[k])}` };
  });
}

// Ink-family shades for robot paths: dark and thin, told apart by a slight turn of hue (product choice).
const ROBOT_SHADES = ['#1e2a3f', '#3f5f8a', '#6a4f7c', '#2f6458', '#7a5a36', '#55606f', '#8a3f4f', '#40507a'] as const;

/** Returns the path shade of the robot at `index` in the layer's list (CSS colour; repeats after eight robots). */
export function robotShade(index: number): string {
  return ROBOT_SHADES[((index % ROBOT_SHADES.length) + ROBOT_SHADES.length) % ROBOT_SHADES.length];
}

/** The zone statuses the map draws, with their outline: line width in pixels and SVG dash pattern (none = solid). */
export const ZONE_OUTLINES = {
  open: { weight: 3, dashArray: undefined, lineCap: 'butt', words: 'solid: open' },
  acknowledged: { weight: 2, dashArray: '7 5', lineCap: 'butt', words: 'dashed: acknowledged' },
  planned: { weight: 2.5, dashArray: '0.5 5', lineCap: 'round', words: 'dotted: remap planned' },
} as const satisfies Record<string, { weight: number; dashArray: string | undefined; lineCap: 'butt' | 'round'; words: string }>;

/** Fill opacity of a persistent zone (intermittent ones are hatched instead). */
export const ZONE_FILL_OPACITY = 0.32;
