import type { DayCounters } from '../../../../shared/detect/change-detection.js';
import { accumulateScan, createCounters, type EvidenceCounters } from '../../../../shared/scan/accumulate.js';
import { parseScanLine } from '../../../../shared/scan/scan-record.js';
import { createScenario, type Scenario, type ScenarioOptions } from '../../../../shared/sim/scenario.js';

/**
 * Per-day evidence of a simulated site, built the way ingest builds it: every simulated scan is
 * written as its JSON line, read back by parseScanLine and counted by accumulateScan with the
 * robot's configured mount. Counters are kept per day and per robot group as Uint16 arrays
 * (4 bytes per cell per day and group), because a test file holds several scenarios at once.
 */
export interface ScenarioEvidence {
  scenario: Scenario;
  /** Site-local dates of the window's days, oldest first. */
  dates: string[];
  /** Scenario day numbers of the window, oldest first. */
  dayNumbers: number[];
  /** A fresh iterable over the window's days, pooling the named groups' evidence (all groups when omitted). */
  days(groups?: string[]): () => Iterable<DayCounters>;
}

/** How to build the evidence: the scenario, the window and which robots form which group. */
export interface EvidenceOptions {
  scenario: ScenarioOptions;
  /** Number of days at the end of the scenario to keep. */
  windowDays: number;
  /** Group name of each robot; robots not listed go to group "rest". */
  groups?: Record<string, string>;
}

const NOW = new Date('2100-01-01T00:00:00Z');

/** Simulates the scenario's last `windowDays` days and returns their per-day, per-group counters (hits and passes per cell). */
export function buildScenarioEvidence(options: EvidenceOptions): ScenarioEvidence {
  const scenario = createScenario(options.scenario);
  const cells = scenario.map.width * scenario.map.height;
  const first = scenario.truth.days - options.windowDays;
  const dayNumbers = Array.from({ length: options.windowDays }, (_, d) => first + d);
  const groupOf = (robot: string): string => options.groups?.[robot] ?? 'rest';
  const store = new Map<string, { hits: Uint16Array; passes: Uint16Array }[]>();
  const mounts = new Map(scenario.robots.flatMap((r) => r.mounts.map((m) => [`${r.name}/${m.name}`, m] as const)));

  for (const day of dayNumbers) {
    const perGroup = new Map<string, EvidenceCounters>();
    for (const rec of scenario.scansForDay(day)) {
      const parsed = parseScanLine(JSON.stringify(rec), { now: NOW });
      if (!parsed.ok) throw new Error(`Simulated line refused: ${parsed.reason}`);
      const group = groupOf(rec.robot);
      let c = perGroup.get(group);
      if (!c) {
        c = createCounters(scenario.map);
        perGroup.set(group, c);
      }
      accumulateScan(scenario.map, c, parsed.scan, mounts.get(`${rec.robot}/${rec.scanner}`) ?? null);
    }
    for (const [group, c] of perGroup) {
      if (!store.has(group)) store.set(group, []);
      store.get(group)!.push({ hits: narrow(c.hits), passes: narrow(c.passes) });
    }
  }

  const dates = dayNumbers.map((d) => scenario.truth.dayDates[d]);
  return {
    scenario,
    dates,
    dayNumbers,
    days: (groups) => () => iterateDays(store, groups ?? [...store.keys()], dates, cells),
  };
}

/** Copies day counters into Uint16 storage; throws if a count does not fit (it never comes near 65,535 at test settings). */
function narrow(src: Uint32Array): Uint16Array {
  const out = new Uint16Array(src.length);
  for (let k = 0; k < src.length; k++) {
    if (src[k] > 0xffff) throw new RangeError(`A day's count of ${src[k]} does not fit the test store.`);
    out[k] = src[k];
  }
  return out;
}

/**
 * Yields one day at a time into the same pair of Uint32 buffers, which is what detectChanges
 * allows: it reads a day's counters completely before asking for the next.
 */
function* iterateDays(
  store: Map<string, { hits: Uint16Array; passes: Uint16Array }[]>,
  groups: string[],
  dates: string[],
  cells: number,
): Generator<DayCounters> {
  const hits = new Uint32Array(cells);
  const passes = new Uint32Array(cells);
  for (let d = 0; d < dates.length; d++) {
    hits.fill(0);
    passes.fill(0);
    for (const g of groups) {
      const day = store.get(g)?.[d];
      if (!day) continue;
      for (let k = 0; k < cells; k++) {
        hits[k] += day.hits[k];
        passes[k] += day.passes[k];
      }
    }
    yield { day: dates[d], hits, passes };
  }
}
