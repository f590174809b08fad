import { describe, expect, it } from 'vitest';
import { localDayOf, localInstant, millimetres, pValueText, sharePercentWhole, siteDate, stationPermissions, verdictLabel, verdictTone, zoneOffsetMinutes } from '../../../../../src/components/docking/docking-format.js';

describe('docking tab formatting', () => {
  it('when site-local hours are turned into instants, then daylight-saving days land on the right UTC time', () => {
    // Europe/London: UTC+0 until 01:00 UTC on 29 Mar 2026, UTC+1 after (EU summer time rule, common knowledge).
    expect(zoneOffsetMinutes('Europe/London', Date.UTC(2026, 2, 29, 0, 30))).toBe(0);
    expect(zoneOffsetMinutes('Europe/London', Date.UTC(2026, 2, 29, 1, 30))).toBe(60);
    expect(new Date(localInstant('2026-03-29', 0, 'Europe/London')).toISOString()).toBe('2026-03-29T00:00:00.000Z');
    expect(new Date(localInstant('2026-03-29', 12, 'Europe/London')).toISOString()).toBe('2026-03-29T11:00:00.000Z');
    // America/Chicago in November is UTC−6.
    expect(new Date(localInstant('2026-11-20', 0, 'America/Chicago')).toISOString()).toBe('2026-11-20T06:00:00.000Z');
    expect(localDayOf(Date.UTC(2026, 10, 20, 3), 'America/Chicago')).toBe('2026-11-19');
    expect(localDayOf(Date.UTC(2026, 10, 20, 3), 'Europe/London')).toBe('2026-11-20');
  });

  it('when dates are written, then the year shows only when it is not the reference year', () => {
    const ref = Date.UTC(2026, 11, 2);
    expect(siteDate(Date.UTC(2026, 10, 27, 14, 18), 'Europe/London', false, ref)).toBe('27 Nov');
    expect(siteDate(Date.UTC(2026, 10, 27, 14, 18), 'Europe/London', true, ref)).toBe('27 Nov, 14:18');
    expect(siteDate(Date.UTC(2027, 1, 1), 'Europe/London', false, ref)).toBe('1 Feb 2027');
  });

  it('when figures are written, then units, shares and p-values read as on the page', () => {
    expect(millimetres(4.24)).toBe('4.2 mm');
    expect(millimetres(-18.2)).toBe('−18 mm');
    expect(sharePercentWhole(0.368)).toBe('37 %');
    expect(sharePercentWhole(0.996)).toBe('99.6 %');
    expect(sharePercentWhole(1)).toBe('100 %');
    expect(pValueText(0.0004)).toBe('p < 0.001');
    expect(pValueText(0.0057)).toBe('p = 0.0057');
  });

  it('when a verdict or a role is shown, then the words, tones and allowed actions follow the Docking tab’s rules', () => {
    expect([verdictLabel('drifting'), verdictTone('drifting')]).toEqual(['drifting', 'red']);
    expect([verdictLabel('out_of_tolerance'), verdictTone('out_of_tolerance')]).toEqual(['out of tolerance', 'amber']);
    expect([verdictLabel('insufficient'), verdictTone('steady')]).toEqual(['too few dockings', 'teal']);
    expect(stationPermissions('site_manager')).toEqual({ manage: true, attachModel: false, setTolerance: false });
    expect(stationPermissions('mapper')).toEqual({ manage: true, attachModel: true, setTolerance: false });
    expect(stationPermissions('admin')).toEqual({ manage: true, attachModel: true, setTolerance: true });
    expect(stationPermissions('viewer')).toEqual({ manage: false, attachModel: false, setTolerance: false });
  });
});
