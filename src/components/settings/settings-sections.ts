/* How the Settings tab groups a site's settings and what it says each one changes. */
import type { SettingsValues } from './settings-rules';

/** A row of the Settings tab: a setting, or the site's time zone. */
export type SettingsRowKey = keyof SettingsValues | 'timezone';

/** One group of settings with a sentence on what the group is about. */
export interface SettingsSectionSpec {
  id: string;
  title: string;
  intro: string;
  rows: SettingsRowKey[];
}

/** The groups in the order the page shows them. */
export const SETTINGS_SECTIONS: readonly SettingsSectionSpec[] = [
  {
    id: 'detection',
    title: 'Nightly detection',
    intro: 'Once a night Driftline compares the evidence of the last days with the active map and updates the changed zones.',
    rows: ['timezone', 'detectionHour', 'detectionWindowDays', 'clearZoneAfterRuns'],
  },
  {
    id: 'health',
    title: 'Health bands',
    intro: 'The health score is the share of laser returns the active map explains over the last 7 days. The bands turn it into a word in the site header, the fleet overview and the forecast.',
    rows: ['healthGoodMin', 'healthWatchMin'],
  },
  {
    id: 'returns',
    title: 'How returns are judged',
    intro: 'Each laser return is checked against the active map as it arrives: the agreement figures, the heat layer and the health score are made of these counts.',
    rows: ['agreementToleranceM', 'agreementBlockM', 'countNoReturnAsPass'],
  },
  {
    id: 'scanner',
    title: 'Scanner check',
    intro: 'When one robot explains clearly fewer returns than the rest of the fleet in the same places, its scanner is the likely cause, not the building.',
    rows: ['scannerFlagZ', 'scannerMinReturnsPerDay'],
  },
  {
    id: 'evidence',
    title: 'Evidence kept',
    intro: 'Evidence is the per-cell count of hits and passes per robot and site-local day; the daily clean-up deletes what is older than this.',
    rows: ['retentionDays'],
  },
  {
    id: 'remaps',
    title: 'Remap planning',
    intro: 'A remap request re-drives its zones and a margin around them. Its duration is estimated as lanes one lane width apart over that area at the drive speed, plus the driving between its parts and a fixed setup.',
    rows: ['remapDriveSpeedMps', 'remapSweepWidthM', 'remapSetupMinutes', 'remapMarginM'],
  },
  {
    id: 'docking',
    title: 'Docking accuracy',
    intro: 'Robots report where they came to rest at each docking station. A docking is within tolerance when both its position and its heading are; a station may set its own tolerance on its page.',
    rows: ['dockingToleranceMm', 'dockingToleranceDeg'],
  },
];

/** What each setting changes, in a sentence or two. */
export const SETTING_HELP: Record<SettingsRowKey, string> = {
  timezone:
    'The site’s local time: the nightly run and the site-local days of evidence and health follow it, daylight-saving changes included.',
  detectionHour:
    'The nightly comparison starts at this hour, local to the site’s time zone; the zone handles daylight-saving changes. Choose a quiet hour after the last shift. The scheduler picks up a new hour within about 10 minutes.',
  detectionWindowDays:
    'Days of evidence each nightly run pools. A longer window sees smaller or rarely visited changes; a shorter one notices a change sooner.',
  clearZoneAfterRuns: 'A zone the nightly run no longer finds is marked cleared after this many runs in a row without it.',
  healthGoodMin: 'A score at or above this is “good”.',
  healthWatchMin: 'From this up to “good” is “watch”; below it the site shows “remap advised”, and the forecast says when the score will get there.',
  agreementToleranceM:
    'A return counts as explained when it lands within this distance of mapped structure. Applies to scans received from now on: returns already counted keep the tolerance they were counted with. The nightly comparison uses it from its next run.',
  agreementBlockM:
    'Side of the squares in which agreement is counted for the heat layer and the scanner check. It cannot be changed: the stored counts are kept in squares of this size.',
  countNoReturnAsPass:
    'Off by default: dark or shiny surfaces often send no light back, and counting those beams as passes would make structure that is still there look missing. Applies to scans received from now on.',
  scannerFlagZ:
    'A robot gets “scanner check advised” when, over the last 7 days, its agreement sits this far below the rest of the fleet’s (median robust z-score at or below this). Further from zero means fewer, surer flags.',
  scannerMinReturnsPerDay:
    'A day on which a robot’s scanner sent fewer returns than this, in places the rest of the fleet also saw, is left out of its check, so a robot that barely drove is not judged on a handful of returns.',
  remapDriveSpeedMps: 'The mapping robot’s average speed while it re-drives an area, turns included. Changes the estimate of requests created from now on.',
  remapSweepWidthM:
    'How wide a strip of floor one pass of the mapping robot records well enough for the map. Wider lanes mean fewer passes and a shorter estimate.',
  remapSetupMinutes: 'Time a remap run takes besides driving: bringing the robot, starting and closing the mapping session. Added to every estimate.',
  remapMarginM:
    'The area to re-drive is the zones grown by this margin, so that the new map joins the old one on ground surveyed twice. Applies to requests created from now on.',
  dockingToleranceMm:
    'How far from its nominal docking position a robot may come to rest, in any direction, and still count as docked accurately. The default of 10 mm follows what charging contacts commonly allow (common practice, from memory); set what your stations’ maker states. Applies to every figure at once, past dockings included.',
  dockingToleranceDeg:
    'How far the robot’s heading may differ from the nominal docking heading. The default of 1° is common practice (from memory). Applies to every figure at once, past dockings included.',
  retentionDays:
    'Evidence older than this is deleted. It must cover the detection window plus 14 days, so that the nightly comparison and the health score’s two weeks have their days.',
};
