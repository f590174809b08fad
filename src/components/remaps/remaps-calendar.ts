// Calendar maths of the remaps calendar without Vue: the days a month or week view shows, and
// where each request's window lands on them. Days are calendar dates 'YYYY-MM-DD' handled as UTC
// midnights, so the browser's own time zone never moves a day; a window is placed by its site-local
// start and end ('YYYY-MM-DD HH:mm'), the time the mapping team meets on site.

const DAY_MS = 86_400_000;

/** Returns the calendar date `days` after `day` (negative: before). */
export function addDays(day: string, days: number): string {
  return new Date(Date.parse(`${day}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);
}

/** Returns the ISO weekday of a date, 1 = Monday … 7 = Sunday. */
export function isoWeekday(day: string): number {
  const d = new Date(`${day}T00:00:00Z`).getUTCDay();
  return d === 0 ? 7 : d;
}

/** Returns the Monday of the week that holds `day`. */
export function weekStart(day: string): string {
  return addDays(day, 1 - isoWeekday(day));
}

/** Returns the first day of the month that holds `day`. */
export function monthStart(day: string): string {
  return `${day.slice(0, 7)}-01`;
}

/** Returns the first day of the month `months` after the one holding `day`. */
export function addMonths(day: string, months: number): string {
  const year = Number(day.slice(0, 4));
  const month = Number(day.slice(5, 7)) - 1 + months;
  const y = year + Math.floor(month / 12);
  const m = ((month % 12) + 12) % 12;
  return `${String(y).padStart(4, '0')}-${String(m + 1).padStart(2, '0')}-01`;
}

/**
 * Returns the days of a month view: whole weeks, Monday first, from the week holding the 1st to the
 * week holding the last day (4 to 6 weeks of 7 days).
 */
export function monthGridDays(day: string): string[] {
  const first = monthStart(day);
  const last = addDays(addMonths(day, 1), -1);
  const from = weekStart(first);
  const to = addDays(weekStart(last), 6);
  const days: string[] = [];
  for (let d = from; d <= to; d = addDays(d, 1)) days.push(d);
  return days;
}

/** Returns the seven days of the week holding `day`, Monday first. */
export function weekDays(day: string): string[] {
  const from = weekStart(day);
  return Array.from({ length: 7 }, (_, k) => addDays(from, k));
}

/** Returns the minutes since midnight of a site-local 'YYYY-MM-DD HH:mm'. */
function minuteOfDay(local: string): number {
  const time = local.slice(11, 16);
  return Number(time.slice(0, 2)) * 60 + Number(time.slice(3, 5));
}

/** The part of a window that falls on one calendar day, in minutes since that day's midnight [from, to). */
export interface DaySegment {
  day: string;
  fromMinute: number;
  toMinute: number;
  /** True on the window's first and last day respectively (a window past midnight has two or more segments). */
  isStart: boolean;
  isEnd: boolean;
}

/**
 * Returns the pieces of a site-local window [localStart, localEnd) day by day. A window that ends
 * exactly at midnight has no piece on the next day; an empty window keeps a zero-length piece on
 * its day, so that it still shows.
 */
export function daySegments(localStart: string, localEnd: string): DaySegment[] {
  const startDay = localStart.slice(0, 10);
  const endDay = localEnd.slice(0, 10);
  const endMinute = minuteOfDay(localEnd);
  const lastDay = endDay > startDay && endMinute === 0 ? addDays(endDay, -1) : endDay;
  const segments: DaySegment[] = [];
  for (let day = startDay; day <= lastDay; day = addDays(day, 1)) {
    const fromMinute = day === startDay ? minuteOfDay(localStart) : 0;
    const toMinute = day === endDay ? endMinute : 1440;
    segments.push({ day, fromMinute, toMinute: Math.max(fromMinute, toMinute), isStart: day === startDay, isEnd: day === lastDay });
  }
  return segments;
}

/**
 * Returns the UTC instants to ask the server for, so that every window whose site-local days touch
 * [firstDay, lastDay] is included: a day either side covers every time zone (UTC−12 to UTC+14).
 */
export function queryRange(firstDay: string, lastDay: string): { from: string; to: string } {
  return { from: `${addDays(firstDay, -1)}T00:00:00.000Z`, to: `${addDays(lastDay, 2)}T00:00:00.000Z` };
}

/** Returns today's date in the browser's own time zone ('YYYY-MM-DD'). */
export function todayLocal(now: Date): string {
  return `${now.getFullYear()}-${String(now.getMonth() + 1).padStart(2, '0')}-${String(now.getDate()).padStart(2, '0')}`;
}

/** Returns the month of a date in words ("December 2026"). */
export function monthWords(day: string): string {
  return new Intl.DateTimeFormat('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${day}T00:00:00Z`));
}

/** Returns a week's span in words ("7 – 13 Dec 2026", "28 Dec 2026 – 3 Jan 2027"). */
export function weekWords(day: string): string {
  const from = new Date(`${weekStart(day)}T00:00:00Z`);
  const to = new Date(`${addDays(weekStart(day), 6)}T00:00:00Z`);
  const f = (d: Date, parts: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { ...parts, timeZone: 'UTC' }).format(d);
  if (from.getUTCFullYear() !== to.getUTCFullYear()) return `${f(from, { day: 'numeric', month: 'short', year: 'numeric' })} – ${f(to, { day: 'numeric', month: 'short', year: 'numeric' })}`;
  if (from.getUTCMonth() !== to.getUTCMonth()) return `${f(from, { day: 'numeric', month: 'short' })} – ${f(to, { day: 'numeric', month: 'short', year: 'numeric' })}`;
  return `${from.getUTCDate()} – ${f(to, { day: 'numeric', month: 'short', year: 'numeric' })}`;
}

/** A piece of a window placed in a week view's day column: its lane among overlapping pieces and how many lanes the overlap needs. */
export interface LanePlacement {
  lane: number;
  lanes: number;
}

/**
 * Returns side-by-side lanes for pieces of one day ([fromMinute, toMinute), in the order given):
 * pieces that overlap, directly or through others, share a group, each takes the first free lane
 * of its group, and the group's width is split by its lane count.
 */
export function assignLanes(pieces: readonly { fromMinute: number; toMinute: number }[]): LanePlacement[] {
  const order = pieces.map((p, k) => ({ ...p, k })).sort((a, b) => a.fromMinute - b.fromMinute || b.toMinute - a.toMinute);
  const out: LanePlacement[] = pieces.map(() => ({ lane: 0, lanes: 1 }));
  let group: { k: number; lane: number }[] = [];
  let laneEnds: number[] = [];
  let groupEnd = -Infinity;
  const close = () => {
    for (const g of group) out[g.k] = { lane: g.lane, lanes: laneEnds.length };
    group = [];
    laneEnds = [];
  };
  for (const p of order) {
    // A zero-length piece still takes room, so that it shows.
    const end = Math.max(p.toMinute, p.fromMinute + 1);
    if (p.fromMinute >= groupEnd) close();
    let lane = laneEnds.findIndex((e) => e <= p.fromMinute);
    if (lane === -1) {
      lane = laneEnds.length;
      laneEnds.push(end);
    } else {
      laneEnds[lane] = end;
    }
    group.push({ k: p.k, lane });
    groupEnd = group.length === 1 ? end : Math.max(groupEnd, end);
  }
  close();
  return out;
}
