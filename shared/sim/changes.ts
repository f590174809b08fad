import { createRng, mixSeed } from './random.js';
import { boundingBox, boxPolygon, type Box } from './shapes.js';
import type { Structure, WarehouseLayout } from './warehouse.js';

/** Kind of map change as change detection should report it. */
export type ChangeKind = 'missing' | 'new' | 'unmapped';
/** Whether a change stays once it appeared or comes and goes. */
export type ChangePersistence = 'persistent' | 'intermittent';

/** When the scripted changes happen; a day number counts from 0 (the scenario's first day); null switches a change off. */
export interface ChangeOptions {
  /** First day on which two rack bays are gone (default 7). */
  missingFromDay?: number | null;
  /** First day on which a fence stands in the open area (default 12). */
  fenceFromDay?: number | null;
  /** Days with pallets parked in the staging lane; default: a seeded ~40 % of days from day 3 on. */
  palletDays?: readonly number[] | null;
  /** First day on which shelving stands in the area the mapper blanked (default 18). */
  unmappedFromDay?: number | null;
}

/** One scripted change with its ground truth, in metres and scenario days. */
export interface ScriptedChange {
  /** Stable name, e.g. "missing-rack-bays". */
  id: string;
  kind: ChangeKind;
  persistence: ChangePersistence;
  /** Readable description for the demo and for test messages. */
  label: string;
  /** Structure removed ('missing') or added ('new', 'unmapped') on the active days (metres). */
  boxes: Structure[];
  /** Outline of the changed area, counter-clockwise (metres); the bounding box of `boxes`. */
  polygon: [number, number][];
  /** Bounding box of the changed area (metres). */
  bbox: Box;
  /** Scenario days (0-based) on which the change is in effect, ascending. */
  days: number[];
}

/** The scripted changes of a scenario and what the stored map leaves unknown. */
export interface ChangePlan {
  changes: ScriptedChange[];
  /** Areas erased to unknown in the stored map (the 'unmapped' change's stage), metres. */
  blanked: Box[];
}

/** Dropout of a mesh fence: part of the beams pass through the mesh (invented, plausible). */
const FENCE_DROPOUT = 0.3;

function daysFrom(first: number | null | undefined, fallback: number, days: number): number[] {
  const d0 = first === undefined ? fallback : first;
  if (d0 === null) return [];
  const out: number[] = [];
  for (let d = Math.max(0, d0); d < days; d++) out.push(d);
  return out;
}

function finish(id: string, kind: ChangeKind, persistence: ChangePersistence, label: string, boxes: Structure[], days: number[]): ScriptedChange {
  const bbox = boundingBox(boxes);
  return { id, kind, persistence, label, boxes, polygon: boxPolygon(bbox), bbox, days };
}

/** Plans the scripted changes for `days` scenario days on `layout`, seeded for the pallet days. */
export function planChanges(layout: WarehouseLayout, seed: number, days: number, options: ChangeOptions = {}): ChangePlan {
  const changes: ScriptedChange[] = [];
  const blanked: Box[] = [];

  // (a) Two neighbouring bays of the fourth rack row (or the last row of a small building)
  // are taken out: mapped structure that beams now pass through.
  const missingDays = daysFrom(options.missingFromDay, 7, days);
  if (missingDays.length > 0) {
    const row = layout.rackBays[Math.min(3, layout.rackBays.length - 1)];
    const bays = row.slice(1, 3);
    changes.push(finish('missing-rack-bays', 'missing', 'persistent', `Rack bays ${bays.map((b) => b.id).join(', ')} removed`, bays, missingDays));
  }

  // (b) A 6 m mesh fence put up across the open area.
  const fenceDays = daysFrom(options.fenceFromDay, 12, days);
  const oa = layout.openArea;
  if (fenceDays.length > 0) {
    const fy = oa.minY + 7;
    const fence: Structure = { id: 'fence-open-area', kind: 'wall', minX: oa.minX + 2, minY: fy - 0.05, maxX: oa.minX + 8, maxY: fy + 0.05 };
    changes.push(finish('new-fence', 'new', 'persistent', 'Fence put up in the open area', [fence], fenceDays));
  }

  // (c) Pallets parked in a staging lane near the dock doors on some days only.
  let palletDays: number[];
  if (options.palletDays === null) palletDays = [];
  else if (options.palletDays) palletDays = [...new Set(options.palletDays)].filter((d) => d >= 0 && d < days).sort((a, b) => a - b);
  else {
    const rng = createRng(mixSeed(seed, 0x9a11e7));
    palletDays = [];
    for (let d = 3; d < days; d++) if (rng.chance(0.4)) palletDays.push(d);
  }
  if (palletDays.length > 0) {
    const lane: Structure[] = [];
    for (let k = 0; k < 8; k++) {
      const x0 = 10 + 1.5 * k;
      lane.push({ id: `pallet-${k + 1}`, kind: 'rack', minX: x0, minY: 1.6, maxX: x0 + 1.2, maxY: 2.8 });
    }
    changes.push(finish('pallets-staging', 'new', 'intermittent', 'Pallets parked in the staging lane', lane, palletDays));
  }

  // (d) The mapper blanked a patch of the open area to unknown (goods stood there during the
  // mapping run); later shelving is set up inside it, so its returns land in unknown cells.
  // The blanked patch belongs to the stored map whenever this change is on, even if the
  // scenario ends before the shelving arrives: the map must not depend on the scenario length.
  const unmappedDays = daysFrom(options.unmappedFromDay, 18, days);
  const gap: Box = { minX: oa.minX + 1.5, minY: oa.minY + 10, maxX: oa.minX + 6.5, maxY: oa.minY + 15 };
  if (options.unmappedFromDay !== null) blanked.push(gap);
  if (unmappedDays.length > 0) {
    const shelf: Structure = { id: 'shelving-blanked-area', kind: 'rack', minX: gap.minX + 1, minY: gap.minY + 1, maxX: gap.maxX - 1, maxY: gap.maxY - 1 };
    changes.push(finish('unmapped-shelving', 'unmapped', 'persistent', 'Shelving set up where the map is unknown', [shelf], unmappedDays));
  }
  return { changes, blanked };
}

/** Dropout probability (0–1) of a structure's surface: dock doors are dark rubber-sealed, fences are mesh. */
export function surfaceDropout(s: Structure): number {
  if (s.id.startsWith('fence')) return FENCE_DROPOUT;
  return s.kind === 'dock-door' ? 0.15 : 0;
}

/** The true structure on scenario day `day`: the layout with that day's removals and additions (metres). */
export function structureOnDay(layout: WarehouseLayout, plan: ChangePlan, day: number): Structure[] {
  const removed = new Set<string>();
  const added: Structure[] = [];
  for (const c of plan.changes) {
    if (!c.days.includes(day)) continue;
    if (c.kind === 'missing') for (const b of c.boxes) removed.add(b.id);
    else added.push(...c.boxes);
  }
  return [...layout.structure.filter((s) => !removed.has(s.id)), ...added];
}
