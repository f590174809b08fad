import { apiRequest } from './client';
import type { Mount, Robot, RobotToken } from './types';

const robotsPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/robots`;
const tokensPath = (siteId: string, robotId: string) => `${robotsPath(siteId)}/${encodeURIComponent(robotId)}/tokens`;

/** Input for creating a robot: mounts in metres and radians, robot frame. */
export interface RobotInput {
  name: string;
  model: string;
  mounts: Mount[];
}

/** One scanner's share of returns the map explains (0–1) over the last 7 complete days, and per day. */
export interface ScannerAgreement {
  scanner: string;
  agreement7d: number | null;
  returns7d: number;
  days: { day: string; agreement: number | null; returns: number }[];
}

/** One day behind a scanner flag: the scanner's agreement and the fleet's median (0–1), and the robust z between them. */
export interface FlagDay {
  day: string;
  agreement: number;
  fleetMedian: number;
  z: number;
}

/** "Scanner check advised" on a robot's scanner: the figures behind it, the estimated mount error (metres, degrees) and who cleared it. */
export interface ScannerFlag {
  id: string;
  robotId: string;
  scanner: string;
  status: 'active' | 'cleared';
  raisedAt: string;
  figures: { days: FlagDay[]; meanAgreement: number; fleetMedian: number; medianZ: number };
  mount: null | {
    dx: number;
    dy: number;
    dyawDeg: number;
    sigma: { dx: number; dy: number; dyawDeg: number };
    inliers: number;
    converged: boolean;
  };
  summary: string;
  clearedAt: string | null;
  clearedBy: { id: string; name: string } | null;
  note: string | null;
}

/** A robot with its scanners' recent agreement and its scanner flags (active and recent), as the robots tab lists it. */
export interface RobotWithChecks extends Robot {
  scanners: ScannerAgreement[];
  flags: ScannerFlag[];
}

/** Returns the robots of a site with their scanner agreement and flags. */
export async function listRobots(siteId: string): Promise<RobotWithChecks[]> {
  return (await apiRequest<{ robots: RobotWithChecks[] }>(robotsPath(siteId))).robots;
}

/** Clears an active scanner flag after maintenance, with a note saying what was done; the robot's scans count again. */
export async function clearScannerFlag(siteId: string, robotId: string, flagId: string, note: string): Promise<ScannerFlag> {
  const path = `${robotsPath(siteId)}/${encodeURIComponent(robotId)}/flags/${encodeURIComponent(flagId)}/clear`;
  return (await apiRequest<{ flag: ScannerFlag }>(path, { method: 'POST', body: { note } })).flag;
}

/** Creates a robot on a site and returns it. */
export async function createRobot(siteId: string, input: RobotInput): Promise<Robot> {
  return (await apiRequest<{ robot: Robot }>(robotsPath(siteId), { method: 'POST', body: input })).robot;
}

/** Returns a robot's ingest tokens (write roles only; 403 for viewers). */
export async function listRobotTokens(siteId: string, robotId: string): Promise<RobotToken[]> {
  return (await apiRequest<{ tokens: RobotToken[] }>(tokensPath(siteId, robotId))).tokens;
}

/** Creates an ingest token; the secret in the answer is the only time it is ever shown. */
export async function createRobotToken(siteId: string, robotId: string, label: string): Promise<{ token: RobotToken; secret: string }> {
  return apiRequest<{ token: RobotToken; secret: string }>(tokensPath(siteId, robotId), { method: 'POST', body: { label } });
}

/** Revokes an ingest token; the robot's next upload with it is refused. */
export async function revokeRobotToken(siteId: string, robotId: string, tokenId: string): Promise<void> {
  await apiRequest<void>(`${tokensPath(siteId, robotId)}/${encodeURIComponent(tokenId)}`, { method: 'DELETE' });
}
