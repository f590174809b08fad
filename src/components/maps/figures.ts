/** Formatting of counts and file sizes on the map-version and scan-log pages. */

const count = new Intl.NumberFormat('en-GB');

/** Returns a count with thousands separators ("1,204,332"). */
export function wholeNumber(value: number): string {
  return count.format(value);
}

/** Returns a file size in bytes as B, kB, MB or GB with one decimal from kB up ("12.4 MB"); decimal units, as browsers show downloads. */
export function byteSize(bytes: number): string {
  if (bytes < 1000) return `${bytes} B`;
  const units = ['kB', 'MB', 'GB'];
  let value = bytes / 1000;
  let unit = 0;
  while (value >= 1000 && unit < units.length - 1) {
    value /= 1000;
    unit++;
  }
  return `${value.toFixed(1)} ${units[unit]}`;
}

/** Returns part / whole as a percentage with one decimal ("42.5 %"), or "—" when whole is 0. */
export function share(part: number, whole: number): string {
  return whole > 0 ? `${((100 * part) / whole).toFixed(1)} %` : '—';
}

const area = (digits: number) => new Intl.NumberFormat('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });
const AREA_SMALL = area(2);
const AREA_MEDIUM = area(1);
const AREA_LARGE = area(0);

/** Returns an area in m² with precision by size: two decimals below 10 m², one below 1,000 m², whole above ("0.06 m²", "12.4 m²", "1,240 m²"). */
export function squareMetres(value: number): string {
  const format = value < 10 ? AREA_SMALL : value < 1000 ? AREA_MEDIUM : AREA_LARGE;
  return `${format.format(value)} m²`;
}
