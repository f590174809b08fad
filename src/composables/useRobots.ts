import { clearScannerFlag, createRobot, listRobots, type RobotInput, type ScannerFlag } from '@/api/robots.api';
import type { Robot } from '@/api/types';
import { useAsync } from './useAsync';

/**
 * A site's robots with their scanner agreement and flags as `{ data, isLoading, error, run }`, plus
 * `add` that creates one and `clearFlag` that clears a scanner flag; both refresh the list.
 */
export function useRobots(siteId: () => string) {
  const list = useAsync(() => listRobots(siteId()));
  const creation = useAsync((input: RobotInput) => createRobot(siteId(), input));
  const clearing = useAsync((robotId: string, flagId: string, note: string) => clearScannerFlag(siteId(), robotId, flagId, note));

  async function add(input: RobotInput): Promise<Robot | undefined> {
    const robot = await creation.run(input);
    if (robot) await list.run();
    return robot;
  }

  async function clearFlag(robotId: string, flagId: string, note: string): Promise<ScannerFlag | undefined> {
    const flag = await clearing.run(robotId, flagId, note);
    if (flag) await list.run();
    return flag;
  }

  return { ...list, add, isAdding: creation.isLoading, addError: creation.error, clearFlag, isClearing: clearing.isLoading, clearError: clearing.error };
}
