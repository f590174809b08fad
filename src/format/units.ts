/** Formatting of physical quantities for display. */

/** Returns a length in metres with centimetre precision ("0.320 m" → "0.32 m"). */
export function metres(value: number): string {
  return `${value.toFixed(2)} m`;
}

/** Returns an angle given in radians as degrees with one decimal ("1.4°"). */
export function degreesFromRadians(radians: number): string {
  return `${((radians * 180) / Math.PI).toFixed(1)}°`;
}
