import { apiRequest } from './client';

/**
 * Agreement per block of a site's active floor map over whole site-local days: the grid cut into
 * square blocks of `blockCells` cells (`blockM` metres), `cols` × `rows` of them. Block k is row-major
 * from the grid's BOTTOM row: column k % cols, row floor(k / cols), in the grid frame. `returns[k]` is
 * the laser returns counted in the block, `agreement[k]` the share of them the map explains (0–1),
 * null where there were none. Days are 'YYYY-MM-DD' in the site's time zone.
 */
export interface AgreementBlocks {
  mapVersionId: string;
  days: string[];
  blockCells: number;
  blockM: number;
  cols: number;
  rows: number;
  returns: number[];
  agreement: (number | null)[];
}

/** Returns the agreement blocks of the last `days` complete days (1–60), or null when the site has no active floor map. */
export async function getAgreementBlocks(siteId: string, days: number): Promise<AgreementBlocks | null> {
  return (await apiRequest<{ agreement: AgreementBlocks | null }>(`/sites/${encodeURIComponent(siteId)}/agreement`, { query: { days } })).agreement;
}
