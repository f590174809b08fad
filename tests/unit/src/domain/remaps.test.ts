import { describe, expect, it } from 'vitest';
import { allowedRemapActions, beforeAfterWords, durationWords, estimateWords, localWindowWords } from '../../../../src/domain/remaps.js';

describe('allowedRemapActions', () => {
  // Transitions as server/services/remaps.service.ts allows them (its route table of roles and states).
  const base = { approvedAt: '2026-12-01T10:00:00Z', mapVersionAfter: null };
  const proposedByMapper = { ...base, status: 'proposed' as const, approvedAt: null };
  const approved = { ...base, status: 'proposed' as const };
  const after = (status: 'draft' | 'active' | 'archived') => ({ id: 'v2', version: 2, status, activatedAt: null });

  it('when a mapper’s proposal waits, then a site manager may approve or cancel it and the mapper may only cancel it', () => {
    expect(allowedRemapActions(proposedByMapper, 'site_manager')).toEqual(['approve', 'cancel']);
    expect(allowedRemapActions(proposedByMapper, 'mapper')).toEqual(['cancel']);
    expect(allowedRemapActions(proposedByMapper, 'admin')).toEqual(['approve', 'cancel']);
  });

  it('when a request is approved, then mappers and admins may schedule it and site managers may not', () => {
    expect(allowedRemapActions(approved, 'mapper')).toEqual(['schedule', 'cancel']);
    expect(allowedRemapActions(approved, 'site_manager')).toEqual(['cancel']);
  });

  it('when a request is scheduled or in progress, then mappers start, reschedule and attach the new map', () => {
    expect(allowedRemapActions({ ...base, status: 'scheduled' }, 'mapper')).toEqual(['start', 'reschedule', 'cancel']);
    expect(allowedRemapActions({ ...base, status: 'in_progress' }, 'mapper')).toEqual(['attach-map', 'cancel']);
  });

  it('when the attached map is a draft or was rolled back, or the remap did not fix the zones, then another map may be attached; not while it is active', () => {
    expect(allowedRemapActions({ ...base, status: 'map_uploaded', mapVersionAfter: after('draft') }, 'mapper')).toEqual(['attach-map', 'cancel']);
    expect(allowedRemapActions({ ...base, status: 'map_uploaded', mapVersionAfter: after('active') }, 'mapper')).toEqual(['cancel']);
    expect(allowedRemapActions({ ...base, status: 'map_uploaded', mapVersionAfter: after('archived') }, 'mapper')).toEqual(['attach-map', 'cancel']);
    expect(allowedRemapActions({ ...base, status: 'not_fixed', mapVersionAfter: after('active') }, 'admin')).toEqual(['attach-map', 'cancel']);
    expect(allowedRemapActions({ ...base, status: 'not_fixed', mapVersionAfter: after('active') }, 'site_manager')).toEqual(['cancel']);
  });

  it('when the user is a viewer, or the request is verified or cancelled, then there is nothing to do', () => {
    for (const status of ['proposed', 'scheduled', 'in_progress', 'map_uploaded', 'verified', 'not_fixed', 'cancelled'] as const) {
      expect(allowedRemapActions({ ...base, status }, 'viewer')).toEqual([]);
    }
    for (const status of ['verified', 'cancelled'] as const) {
      expect(allowedRemapActions({ ...base, status }, 'admin')).toEqual([]);
    }
  });
});

describe('words', () => {
  it('when a duration is given in minutes, then it reads in hours and minutes, rounded to the minute', () => {
    expect(durationWords(100)).toBe('1 h 40 min');
    expect(durationWords(45.4)).toBe('45 min');
    expect(durationWords(120)).toBe('2 h');
    expect(estimateWords(99.6)).toBe('≈ 1 h 40 min incl. setup');
  });

  it('when a window is on one day or past midnight, then it reads with one or both days (8 Dec 2026 is a Tuesday)', () => {
    expect(localWindowWords('2026-12-08 02:00', '2026-12-08 03:40', 2026)).toBe('Tue 8 Dec, 02:00–03:40');
    expect(localWindowWords('2026-12-08 23:30', '2026-12-09 01:10', 2026)).toBe('Tue 8 Dec, 23:30 – Wed 9 Dec, 01:10');
    expect(localWindowWords('2027-01-05 02:00', '2027-01-05 03:00', 2026)).toBe('Tue 5 Jan 2027, 02:00–03:00');
  });

  it('when verification has figures before and after, then they read as one sentence', () => {
    expect(beforeAfterWords({ agreement: 0.912, changedAreaM2: 14.2 }, { agreement: 0.986, changedAreaM2: 0.4 })).toBe('agreement 91.2 % → 98.6 %, changed area 14.2 → 0.4 m²');
    expect(beforeAfterWords({ agreement: null, changedAreaM2: 3 }, null)).toBe('agreement no returns, changed area 3.0 m² before the new map');
    expect(beforeAfterWords({ agreement: 0.9, changedAreaM2: 3 }, { agreement: null, changedAreaM2: 0 })).toBe('agreement 90.0 % → not measured yet, changed area 3.0 → 0.0 m²');
  });
});
