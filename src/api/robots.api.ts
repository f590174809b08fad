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

/** Returns the robots of a site. */
export async function listRobots(siteId: string): Promise<Robot[]> {
  return (await apiRequest<{ robots: Robot[] }>(robotsPath(siteId))).robots;
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
