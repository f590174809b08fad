import { describe, expect, it } from 'vitest';
import {
  changedFields,
  changeSummary,
  draftFrom,
  fieldErrorsFrom,
  formatSetting,
  limitProblem,
  settingsChange,
  settingsProblems,
  type SettingsValues,
} from '../../../../../src/components/settings/settings-rules.js';

// The product defaults as server/services/site-settings.ts states them (DESIGN.md §4; product choices, not published values).
const defaults: SettingsValues = {
  detectionHour: 2,
  detectionWindowDays: 14,
  clearZoneAfterRuns: 3,
  healthGoodMin: 97,
  healthWatchMin: 90,
  agreementToleranceM: 0.1,
  agreementBlockM: 2,
  countNoReturnAsPass: false,
  scannerFlagZ: 3.5,
  scannerMinReturnsPerDay: 1000,
  retentionDays: 60,
  remapDriveSpeedMps: 0.8,
  remapSweepWidthM: 8,
  remapSetupMinutes: 30,
  remapMarginM: 2,
  // Docking tolerances: common practice for charging contacts, from memory (site-settings.ts).
  dockingToleranceMm: 10,
  dockingToleranceDeg: 1,
};
const zone = 'Europe/London';

// Every limit below is the one the API contract for issue 5 gives ("Site settings") and server/routes/site-settings.routes.ts applies.
describe('site settings: limits of single fields', () => {
  it('when the settings that apply now are edited into nothing, then the form finds no problem', () => {
    expect(settingsProblems(draftFrom(zone, defaults), defaults)).toEqual({});
  });

  it('when the detection hour is 0 or 23, then it is accepted; 24, −1, 2.5 or empty are refused with a sentence', () => {
    expect(limitProblem('detectionHour', 0)).toBeNull();
    expect(limitProblem('detectionHour', 23)).toBeNull();
    expect(limitProblem('detectionHour', 24)).toBe('The hour must lie from 0 (midnight) to 23.');
    expect(limitProblem('detectionHour', -1)).toBe('The hour must lie from 0 (midnight) to 23.');
    expect(limitProblem('detectionHour', 2.5)).toMatch(/whole number/);
    expect(limitProblem('detectionHour', null)).toBe('Enter an hour from 0 to 23.');
  });

  it('when the tolerance is at its ends 0.02 m and 0.5 m, then it is accepted; just outside, it is refused naming the range in metres', () => {
    expect(limitProblem('agreementToleranceM', 0.02)).toBeNull();
    expect(limitProblem('agreementToleranceM', 0.5)).toBeNull();
    expect(limitProblem('agreementToleranceM', 0.019)).toBe('Must lie between 0.02 m and 0.5 m.');
    expect(limitProblem('agreementToleranceM', 0.501)).toBe('Must lie between 0.02 m and 0.5 m.');
  });

  it('when a whole-number setting gets a fraction or leaves its range, then the sentence names the range and its unit', () => {
    expect(limitProblem('detectionWindowDays', 2)).toBe('Must lie between 3 days and 60 days.');
    expect(limitProblem('retentionDays', 14.5)).toBe('Enter a whole number between 14 days and 730 days.');
    expect(limitProblem('scannerMinReturnsPerDay', 1_000_001)).toBe('Must lie between 100 returns and 1,000,000 returns.');
    expect(limitProblem('clearZoneAfterRuns', 30)).toBeNull();
    expect(limitProblem('scannerFlagZ', 10)).toBeNull();
    expect(limitProblem('healthWatchMin', 49.9)).toBe('Must lie between 50 % and 100 %.');
  });
});

describe('site settings: rules across two fields', () => {
  it('when the watch band is raised to the good band, then the refusal stands beside the watch band', () => {
    const draft = { ...draftFrom(zone, defaults), healthWatchMin: 97 };
    expect(settingsProblems(draft, defaults)).toEqual({ healthWatchMin: '“Watch” must start below “good” (97 %).' });
  });

  it('when the good band is lowered below the watch band, then the refusal stands beside the good band', () => {
    const draft = { ...draftFrom(zone, defaults), healthGoodMin: 85 };
    expect(settingsProblems(draft, defaults)).toEqual({ healthGoodMin: '“Good” must start above “watch” (90 %).' });
  });

  it('when good is just above watch, then nothing is refused', () => {
    const draft = { ...draftFrom(zone, defaults), healthGoodMin: 90.5 };
    expect(settingsProblems(draft, defaults)).toEqual({});
  });

  it('when retention falls below the window plus 14 days, then retention is refused with the least it may be', () => {
    const draft = { ...draftFrom(zone, defaults), retentionDays: 27 };
    expect(settingsProblems(draft, defaults)).toEqual({ retentionDays: 'Keep at least 28 days: the 14 days compared plus 14 for the health score.' });
    expect(settingsProblems({ ...draft, retentionDays: 28 }, defaults)).toEqual({});
  });

  it('when the window grows past what the kept evidence covers, then the window is refused with its largest value', () => {
    const applied = { ...defaults, retentionDays: 40 };
    const draft = { ...draftFrom(zone, applied), detectionWindowDays: 30 };
    expect(settingsProblems(draft, applied)).toEqual({ detectionWindowDays: 'With 40 days of evidence kept, the window can be at most 26 days.' });
  });

  it('when the time zone is empty, then it is refused', () => {
    expect(settingsProblems({ ...draftFrom(zone, defaults), timezone: '' }, defaults)).toEqual({ timezone: 'Choose the site’s time zone.' });
  });
});

describe('site settings: what is sent', () => {
  it('when two settings and the time zone change, then only those are sent, and the summary reads before → after', () => {
    const draft = { ...draftFrom(zone, defaults), detectionHour: 4, countNoReturnAsPass: true, timezone: 'Europe/Berlin' };
    expect(changedFields(draft, zone, defaults)).toEqual(['timezone', 'detectionHour', 'countNoReturnAsPass']);
    const change = settingsChange(draft, zone, defaults);
    expect(change).toEqual({ timezone: 'Europe/Berlin', detectionHour: 4, countNoReturnAsPass: true });
    expect(changeSummary(change, zone, defaults)).toEqual([
      'Time zone: Europe/London → Europe/Berlin',
      'Local hour of the run: 02:00 → 04:00',
      'Beams without a return count as passes: no → yes',
    ]);
  });

  it('when nothing differs from what applies now, then nothing is sent', () => {
    expect(settingsChange(draftFrom(zone, defaults), zone, defaults)).toEqual({});
  });
});

describe('site settings: reading the server', () => {
  it('when a 400 names fields, then each known field gets its messages as sentences and unknown fields are left out', () => {
    const details = { fieldErrors: { healthGoodMin: ['must keep good above watch'], detectionHour: ['must be at most 23', 'must be a whole number'], colour: ['nope'] } };
    expect(fieldErrorsFrom(details)).toEqual({ healthGoodMin: 'Must keep good above watch.', detectionHour: 'Must be at most 23. Must be a whole number.' });
  });

  it('when a 400 carries no field errors, then no field is marked', () => {
    expect(fieldErrorsFrom(undefined)).toEqual({});
    expect(fieldErrorsFrom({ fieldErrors: 'bad' })).toEqual({});
    expect(fieldErrorsFrom({ fieldErrors: { detectionHour: [42, ''] } })).toEqual({});
  });

  it('when values are shown, then each carries its unit', () => {
    expect(formatSetting('detectionHour', 2)).toBe('02:00');
    expect(formatSetting('detectionHour', 23)).toBe('23:00');
    expect(formatSetting('retentionDays', 1)).toBe('1 day');
    expect(formatSetting('clearZoneAfterRuns', 3)).toBe('3 runs');
    expect(formatSetting('healthGoodMin', 97.5)).toBe('97.5 %');
    expect(formatSetting('agreementToleranceM', 0.1)).toBe('0.10 m');
    expect(formatSetting('agreementToleranceM', 0.125)).toBe('0.125 m');
    expect(formatSetting('agreementBlockM', 2)).toBe('2 m');
    expect(formatSetting('scannerFlagZ', 3.5)).toBe('−3.5');
    expect(formatSetting('scannerMinReturnsPerDay', 1000)).toBe('1,000 returns');
  });
});
