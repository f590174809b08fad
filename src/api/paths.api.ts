import { apiRequest } from './client';

/** A point of a robot's path in map metres: [x, y]. */
export type PathPoint = [x: number, y: number];

/**
 * Where one robot drove in the window: its tracks in map metres, thinned to points at least 0.5 m
 * apart; a new track starts after a gap of more than 60 s or a jump of more than 5 m.
 */
export interface RobotPath {
  robotId: string;
  name: string;
  tracks: PathPoint[][];
}

/** The robots' paths on a site's active floor map between two instants (ISO 8601); robots without scans are left out. */
export interface RobotPaths {
  mapVersionId: string;
  from: string;
  to: string;
  robots: RobotPath[];
}

/** Returns the robots' paths of the last `hours` hours (1–168), or null when the site has no active floor map. */
export async function getRobotPaths(siteId: string, hours: number): Promise<RobotPaths | null> {
  return (await apiRequest<{ paths: RobotPaths | null }>(`/sites/${encodeURIComponent(siteId)}/paths`, { query: { hours } })).paths;
}
