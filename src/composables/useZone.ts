import { acknowledgeZone, dismissZone, getZone, type Zone } from '@/api/zones.api';
import { useAsync } from './useAsync';

/**
 * One zone with its timeline and history as `{ data, isLoading, error, run }`, plus acknowledge and
 * dismiss; each action reloads the zone (its history gains the change) and returns the changed zone.
 */
export function useZone(siteId: () => string, zoneId: () => string | null) {
  const detail = useAsync(async () => {
    const id = zoneId();
    return id ? getZone(siteId(), id) : undefined;
  });
  const acknowledgement = useAsync((id: string, note: string) => acknowledgeZone(siteId(), id, note));
  const dismissal = useAsync((id: string, reason: string) => dismissZone(siteId(), id, reason));

  async function acknowledge(note: string): Promise<Zone | undefined> {
    const id = zoneId();
    if (!id) return undefined;
    const zone = await acknowledgement.run(id, note);
    if (zone) await detail.run();
    return zone;
  }

  async function dismiss(reason: string): Promise<Zone | undefined> {
    const id = zoneId();
    if (!id) return undefined;
    const zone = await dismissal.run(id, reason);
    if (zone) await detail.run();
    return zone;
  }

  return {
    ...detail,
    acknowledge,
    isAcknowledging: acknowledgement.isLoading,
    acknowledgeError: acknowledgement.error,
    dismiss,
    isDismissing: dismissal.isLoading,
    dismissError: dismissal.error,
  };
}
