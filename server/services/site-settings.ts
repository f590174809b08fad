import type { Site } from '../entities/index.js';

/** A site's settings with every default filled in (DESIGN.md §4). */
export interface SiteSettings {
  /** A return is explained within this distance of mapped structure, metres (DESIGN.md §4.3 default; a product choice). */
  agreementToleranceM: number;
  /** Side of an agreement block for the heat layer, metres (DESIGN.md §4.3 default; a product choice). */
  agreementBlockM: number;
  /** Count beams without a return as passes (default off: dark or shiny surfaces give no return). */
  countNoReturnAsPass: boolean;
  /** With countNoReturnAsPass: trace no-return beams this far, metres (default: the scan's rangeMax). */
  maxNoReturnTraceM?: number;
  /** Health score at or above which the map is "good", percent (DESIGN.md §4.3 product default). */
  healthGoodMin: number;
  /** Health score at or above which the map is "watch" (below: "remap advised"), percent (DESIGN.md §4.3 product default). */
  healthWatchMin: number;
  /** Days of evidence change detection pools (DESIGN.md §4.4 default 14; a product choice). */
  detectionWindowDays: number;
  /** Local hour (0–23) of the nightly detection run (product choice: 02:00, after the late shift). */
  detectionHour: number;
  /** Runs a zone may go unseen before it is marked cleared (product choice). */
  clearZoneAfterRuns: number;
  /** Days of evidence kept (product choice, 60). */
  retentionDays: number;
  /** A robot's scanner is flagged when its median robust z over the recent days is at or below −this (product choice). */
  scannerFlagZ: number;
  /** Fewest returns a robot's scanner needs on a day for the day to count in the consistency check (product choice). */
  scannerMinReturnsPerDay: number;
  /** Speed of the mapping robot while it re-drives an area, m/s (product choice, 0.8: a walking-pace mapping drive). */
  remapDriveSpeedMps: number;
  /** Width of floor one mapping lane covers, metres (product choice, 8: lanes one aisle-and-rack apart). */
  remapSweepWidthM: number;
  /** Fixed time of a remap run besides driving: bringing the robot, starting and closing the mapping session, minutes (product choice). */
  remapSetupMinutes: number;
  /** A remap re-drives its zones grown by this margin, metres, so the new map joins the old one on surveyed ground (product choice). */
  remapMarginM: number;
  /** A docking is accurate within this radial distance of the station's nominal docking position, millimetres (default 10: charging contacts and quoted docking repeatability of mobile robots are commonly around ±10 mm; common practice, from memory). */
  dockingToleranceMm: number;
  /** A docking is accurate within this heading difference, degrees (default 1°: common practice, from memory). */
  dockingToleranceDeg: number;
}

/** Product defaults of the site settings. */
export const SITE_SETTING_DEFAULTS: SiteSettings = {
  agreementToleranceM: 0.1,
  agreementBlockM: 2,
  countNoReturnAsPass: false,
  healthGoodMin: 97,
  healthWatchMin: 90,
  detectionWindowDays: 14,
  detectionHour: 2,
  clearZoneAfterRuns: 3,
  retentionDays: 60,
  scannerFlagZ: 3.5,
  scannerMinReturnsPerDay: 1000,
  remapDriveSpeedMps: 0.8,
  remapSweepWidthM: 8,
  remapSetupMinutes: 30,
  remapMarginM: 2,
  dockingToleranceMm: 10,
  dockingToleranceDeg: 1,
};

/** The site's settings, defaults for what it does not set. */
export function siteSettings(site: Pick<Site, 'settings'>): SiteSettings {
  return { ...SITE_SETTING_DEFAULTS, ...(site.settings as Partial<SiteSettings>) };
}
