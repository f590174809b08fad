import { computed } from 'vue';
import { listRemapsInRange, type RemapRequest } from '@/api/remaps.api';
import { daySegments, monthGridDays, queryRange, weekDays, type DaySegment } from '@/components/remaps/remaps-calendar';
import { useAsync } from './useAsync';

export type CalendarMode = 'month' | 'week';

/** One request's piece on one calendar day. */
export interface CalendarEntry {
  remap: RemapRequest;
  segment: DaySegment;
}

/**
 * The remaps calendar: the days a month or week view shows around `anchor` ('YYYY-MM-DD'), the
 * requests with a window on those days across every site the user may see, as
 * `{ data, isLoading, error, run }`, and the requests' pieces by day, placed at their site-local times.
 */
export function useRemapsCalendar(mode: () => CalendarMode, anchor: () => string) {
  const days = computed(() => (mode() === 'month' ? monthGridDays(anchor()) : weekDays(anchor())));
  const state = useAsync(() => {
    const shown = days.value;
    const { from, to } = queryRange(shown[0], shown[shown.length - 1]);
    return listRemapsInRange(from, to);
  });

  const byDay = computed(() => {
    const shown = new Set(days.value);
    const map = new Map<string, CalendarEntry[]>();
    for (const remap of state.data.value ?? []) {
      if (!remap.window) continue;
      for (const segment of daySegments(remap.window.localStart, remap.window.localEnd)) {
        if (!shown.has(segment.day)) continue;
        const list = map.get(segment.day) ?? [];
        list.push({ remap, segment });
        map.set(segment.day, list);
      }
    }
    for (const list of map.values()) list.sort((a, b) => a.segment.fromMinute - b.segment.fromMinute || a.remap.number - b.remap.number);
    return map;
  });

  /** Requests with a window on the shown days (a request across midnight counts once). */
  const count = computed(() => new Set([...byDay.value.values()].flat().map((e) => e.remap.id)).size);

  return { ...state, days, byDay, count };
}
