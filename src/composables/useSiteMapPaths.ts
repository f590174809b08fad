import { getRobotPaths } from '@/api/paths.api';
import { useAsync } from './useAsync';

/** The robots' paths of the last `hours` hours for the paths layer, as `{ data, isLoading, error, run }`. */
export function useSiteMapPaths(siteId: () => string, hours: number) {
  return { ...useAsync(() => getRobotPaths(siteId(), hours)), hours };
}
