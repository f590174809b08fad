import { createRobot, listRobots, type RobotInput } from '@/api/robots.api';
import type { Robot } from '@/api/types';
import { useAsync } from './useAsync';

/** A site's robots as `{ data, isLoading, error, run }`, plus `add` that creates one and refreshes the list. */
export function useRobots(siteId: () => string) {
  const list = useAsync(() => listRobots(siteId()));
  const creation = useAsync((input: RobotInput) => createRobot(siteId(), input));

  async function add(input: RobotInput): Promise<Robot | undefined> {
    const robot = await creation.run(input);
    if (robot) await list.run();
    return robot;
  }

  return { ...list, add, isAdding: creation.isLoading, addError: creation.error };
}
