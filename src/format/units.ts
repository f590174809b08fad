/** Formatting of physical quantities for display. */

/** Returns a length in metres with centimetre precision ("−0.42 m"). */
export function metres(value: number): string {
  // A typographic minus reads better than a hyphen in tables of coordinates.
  return `${value.toFixed(2).replace('-', '−')} m`;
}

/** Returns an angle given in radians as degrees with one decimal ("1.4°"). */
export function degreesFromRadians(radians: number): string {
  return `${((radians * 180) / Math.PI).toFixed(1).replace('-', '−')}°`;
}
