import { computed } from 'vue';
import { getAgreementBlocks } from '@/api/agreement.api';
import { trafficPerM2PerDay } from '@/components/map/map-blocks';
import { trafficLimits } from '@/components/map/map-scales';
import { useAsync } from './useAsync';

/**
 * The agreement blocks of the last `days` complete days for the heat and traffic layers, as
 * `{ data, isLoading, error, run }`, with each block's traffic (returns per m² per day) and the
 * traffic scale's limits derived from them.
 */
export function useSiteMapAgreement(siteId: () => string, days: number) {
  const state = useAsync(() => getAgreementBlocks(siteId(), days));
  const traffic = computed(() => {
    const blocks = state.data.value;
    if (!blocks) return null;
    const values = trafficPerM2PerDay(blocks.returns, blocks.blockM, blocks.days.length);
    return { values, limits: trafficLimits(values.reduce((m, v) => Math.max(m, v), 0)) };
  });
  const hasReturns = computed(() => state.data.value?.returns.some((r) => r > 0) ?? false);
  return { ...state, days, traffic, hasReturns };
}
