/**
 * Error thrown for a map file (image or metadata) that cannot be read as a grid map.
 * The message is one readable sentence saying what is wrong, fit to show to the uploader.
 */
export class GridFormatError extends Error {
  /** Creates the error; `message` is a full sentence ending with a full stop. */
  constructor(message: string) {
    super(message);
    this.name = 'GridFormatError';
  }
}

/** Formats a count with thousands separators for error messages, e.g. 1200 → "1,200". */
export function formatCount(n: number): string {
  return n.toLocaleString('en-US');
}
