import { computed } from 'vue';
import { listRemapsInRange, type RemapRequest } from '@/api/remaps.api';
import { listSites } from '@/api/sites.api';
import type { Site } from '@/api/types';
import { daySegments, monthGridDays, queryRange, weekDays, type DaySegment } from '@/components/remaps/remaps-calendar';
import { useAsync } from './useAsync';

export type CalendarMode = 'month' | 'week';

/** One request's piece on one calendar day, with its site for the label. */
export interface CalendarEntry {
  remap: RemapRequest;
  site: Pick<Site, 'id' | 'name' | 'timezone'> | null;
  segment: DaySegment;
}

/**
 * The remaps calendar: the days a month or week view shows around `anchor` ('YYYY-MM-DD'), the
 * requests with a window on those days across every site the user may see, as
 * `{ data, isLoading, error, run }`, and the requests' pieces by day, placed at their site-local times.
 */
export function useRemapsCalendar(mode: () => CalendarMode, anchor: () => string) {
  const days = computed(() => (mode() === 'month' ? monthGridDays(anchor()) : weekDays(anchor())));
  const sites = useAsync(listSites);
  const state = useAsync(async () => {
    const shown = days.value;
    const { from, to } = queryRange(shown[0], shown[shown.length - 1]);
    // Site names for the labels; asked once per page.
    const [remaps] = await Promise.all([listRemapsInRange(from, to), sites.data.value ? Promise.resolve(sites.data.value) : sites.run()]);
    return remaps;
  });

  const byDay = computed(() => {
    const siteById = new Map((sites.data.value ?? []).map((s) => [s.id, s]));
    const shown = new Set(days.value);
    const map = new Map<string, CalendarEntry[]>();
    for (const remap of state.data.value ?? []) {
      if (!remap.window) continue;
      for (const segment of daySegments(remap.window.localStart, remap.window.localEnd)) {
        if (!shown.has(segment.day)) continue;
        const list = map.get(segment.day) ?? [];
        list.push({ remap, site: siteById.get(remap.siteId) ?? null, segment });
        map.set(segment.day, list);
      }
    }
    for (const list of map.values()) list.sort((a, b) => a.segment.fromMinute - b.segment.fromMinute || a.remap.number - b.remap.number);
    return map;
  });

  /** Requests with a window on the shown days (a request across midnight counts once). */
  const count = computed(() => new Set([...byDay.value.values()].flat().map((e) => e.remap.id)).size);

  return { ...state, days, byDay, count, sitesError: sites.error };
}
