/*
 * A site's settings as the Settings tab shows and edits them: what each one is called, its unit,
 * the limits the server accepts, and the checks that span two fields. The server checks again and
 * has the last word; keep the limits in step with server/routes/site-settings.routes.ts and the
 * cross-field rules with server/services/site-settings.service.ts. This file imports nothing, so
 * the browser and the unit tests read the same rules.
 */

/** The settings that apply to a site, defaults filled in (API contract, "Site settings"). */
export interface SettingsValues {
  /** Site-local hour (0–23) of the nightly detection run. */
  detectionHour: number;
  /** Days of evidence the nightly detection pools. */
  detectionWindowDays: number;
  /** Runs a zone may go unseen before it is marked cleared. */
  clearZoneAfterRuns: number;
  /** Health score at or above which the map is "good", percent. */
  healthGoodMin: number;
  /** Health score at or above which the map is "watch" (below: "remap advised"), percent. */
  healthWatchMin: number;
  /** A return is explained within this distance of mapped structure, metres. */
  agreementToleranceM: number;
  /** Side of an agreement block, metres; read-only. */
  agreementBlockM: number;
  /** Whether beams without a return count as passes. */
  countNoReturnAsPass: boolean;
  /** A scanner is flagged when its median robust z over recent days is at or below minus this. */
  scannerFlagZ: number;
  /** Fewest returns a scanner needs on a day for the day to count in the scanner check. */
  scannerMinReturnsPerDay: number;
  /** Days of evidence kept. */
  retentionDays: number;
  /** Drive speed of the mapping robot on a remap, m/s. */
  remapDriveSpeedMps: number;
  /** Width of floor one mapping lane covers, metres. */
  remapSweepWidthM: number;
  /** Fixed setup time of a remap run, minutes. */
  remapSetupMinutes: number;
  /** Margin a remap area adds around its zones, metres. */
  remapMarginM: number;
  /** Radial position tolerance of a docking, millimetres (stations may override it). */
  dockingToleranceMm: number;
  /** Heading tolerance of a docking, degrees (stations may override it). */
  dockingToleranceDeg: number;
}

/** The settings a number field edits. */
export type NumberField =
  | 'detectionHour'
  | 'detectionWindowDays'
  | 'clearZoneAfterRuns'
  | 'healthGoodMin'
  | 'healthWatchMin'
  | 'agreementToleranceM'
  | 'scannerFlagZ'
  | 'scannerMinReturnsPerDay'
  | 'retentionDays'
  | 'remapDriveSpeedMps'
  | 'remapSweepWidthM'
  | 'remapSetupMinutes'
  | 'remapMarginM'
  | 'dockingToleranceMm'
  | 'dockingToleranceDeg';

/** Every setting an admin may change, besides the time zone. */
export type EditableField = NumberField | 'countNoReturnAsPass';

/** Every field of the form: the editable settings and the site's time zone. */
export type DraftField = EditableField | 'timezone';

/** A change as PATCH /api/sites/:siteId/settings takes it: only the fields that change. */
export type SettingsChange = Partial<Pick<SettingsValues, EditableField>> & { timezone?: string };

/** The form's state: numbers may be empty while a person types. */
export type SettingsDraft = { [F in NumberField]: number | null } & { countNoReturnAsPass: boolean; timezone: string };

/** The range the server accepts for a number setting; `whole` when it must be an integer. */
export interface NumberLimit {
  min: number;
  max: number;
  whole: boolean;
  /** Decimals the field offers (the server takes any finite number within the range for non-whole fields). */
  fractionDigits: number;
}

/** The server's limits per number setting (server/routes/site-settings.routes.ts). */
export const SETTING_LIMITS: Record<NumberField, NumberLimit> = {
  detectionHour: { min: 0, max: 23, whole: true, fractionDigits: 0 },
  detectionWindowDays: { min: 3, max: 60, whole: true, fractionDigits: 0 },
  clearZoneAfterRuns: { min: 1, max: 30, whole: true, fractionDigits: 0 },
  healthGoodMin: { min: 50, max: 100, whole: false, fractionDigits: 1 },
  healthWatchMin: { min: 50, max: 100, whole: false, fractionDigits: 1 },
  agreementToleranceM: { min: 0.02, max: 0.5, whole: false, fractionDigits: 3 },
  scannerFlagZ: { min: 2, max: 10, whole: false, fractionDigits: 2 },
  scannerMinReturnsPerDay: { min: 100, max: 1_000_000, whole: true, fractionDigits: 0 },
  retentionDays: { min: 14, max: 730, whole: true, fractionDigits: 0 },
  remapDriveSpeedMps: { min: 0.1, max: 3, whole: false, fractionDigits: 2 },
  remapSweepWidthM: { min: 1, max: 40, whole: false, fractionDigits: 1 },
  remapSetupMinutes: { min: 0, max: 480, whole: true, fractionDigits: 0 },
  remapMarginM: { min: 0, max: 10, whole: false, fractionDigits: 1 },
  dockingToleranceMm: { min: 1, max: 100, whole: false, fractionDigits: 1 },
  dockingToleranceDeg: { min: 0.1, max: 10, whole: false, fractionDigits: 1 },
};

/** Days evidence must be kept beyond the detection window (server/services/site-settings.service.ts). */
export const RETENTION_MARGIN_DAYS = 14;

/** The editable settings in the order the form lists them. */
export const EDITABLE_FIELDS: readonly EditableField[] = [
  'detectionHour',
  'detectionWindowDays',
  'clearZoneAfterRuns',
  'healthGoodMin',
  'healthWatchMin',
  'agreementToleranceM',
  'countNoReturnAsPass',
  'scannerFlagZ',
  'scannerMinReturnsPerDay',
  'retentionDays',
  'remapDriveSpeedMps',
  'remapSweepWidthM',
  'remapSetupMinutes',
  'remapMarginM',
  'dockingToleranceMm',
  'dockingToleranceDeg',
];

/** What each setting is called on screen. */
export const SETTING_LABELS: Record<keyof SettingsValues | 'timezone', string> = {
  timezone: 'Time zone',
  detectionHour: 'Local hour of the run',
  detectionWindowDays: 'Days of evidence compared',
  clearZoneAfterRuns: 'Zone cleared after unseen runs',
  healthGoodMin: '“Good” from',
  healthWatchMin: '“Watch” from',
  agreementToleranceM: 'Tolerance',
  agreementBlockM: 'Block size',
  countNoReturnAsPass: 'Beams without a return count as passes',
  scannerFlagZ: 'Flag at robust z of',
  scannerMinReturnsPerDay: 'Fewest returns for a day to count',
  retentionDays: 'Days of evidence kept',
  remapDriveSpeedMps: 'Mapping drive speed',
  remapSweepWidthM: 'Width one lane covers',
  remapSetupMinutes: 'Setup per remap run',
  remapMarginM: 'Margin around the zones',
  dockingToleranceMm: 'Docking position tolerance',
  dockingToleranceDeg: 'Docking heading tolerance',
};

const number = (value: number, digits: number, minDigits = 0) =>
  value.toLocaleString('en-GB', { minimumFractionDigits: minDigits, maximumFractionDigits: digits });
const plural = (value: number, one: string, many: string) => `${number(value, 2)} ${value === 1 ? one : many}`;

/** Returns a setting's value with its unit, as the page shows it ("02:00", "14 days", "97 %", "0.10 m"). */
export function formatSetting<F extends keyof SettingsValues>(field: F, value: SettingsValues[F]): string {
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  const v = value as number;
  switch (field) {
    case 'detectionHour':
      return `${String(v).padStart(2, '0')}:00`;
    case 'detectionWindowDays':
    case 'retentionDays':
      return plural(v, 'day', 'days');
    case 'clearZoneAfterRuns':
      return plural(v, 'run', 'runs');
    case 'healthGoodMin':
    case 'healthWatchMin':
      return `${number(v, 2)} %`;
    case 'agreementToleranceM':
      return `${number(v, 3, 2)} m`;
    case 'agreementBlockM':
      return `${number(v, 2)} m`;
    case 'scannerFlagZ':
      return `−${number(v, 2)}`;
    case 'scannerMinReturnsPerDay':
      return `${number(v, 0)} returns`;
    case 'remapDriveSpeedMps':
      return `${number(v, 2)} m/s`;
    case 'remapSweepWidthM':
    case 'remapMarginM':
      return `${number(v, 1)} m`;
    case 'remapSetupMinutes':
      return `${number(v, 0)} min`;
    case 'dockingToleranceMm':
      return `${number(v, 1)} mm`;
    case 'dockingToleranceDeg':
      return `${number(v, 1)}°`;
    default:
      return String(v);
  }
}

/** Returns the form's state for the settings that apply now. */
export function draftFrom(timezone: string, values: SettingsValues): SettingsDraft {
  return {
    timezone,
    detectionHour: values.detectionHour,
    detectionWindowDays: values.detectionWindowDays,
    clearZoneAfterRuns: values.clearZoneAfterRuns,
    healthGoodMin: values.healthGoodMin,
    healthWatchMin: values.healthWatchMin,
    agreementToleranceM: values.agreementToleranceM,
    countNoReturnAsPass: values.countNoReturnAsPass,
    scannerFlagZ: values.scannerFlagZ,
    scannerMinReturnsPerDay: values.scannerMinReturnsPerDay,
    retentionDays: values.retentionDays,
    remapDriveSpeedMps: values.remapDriveSpeedMps,
    remapSweepWidthM: values.remapSweepWidthM,
    remapSetupMinutes: values.remapSetupMinutes,
    remapMarginM: values.remapMarginM,
    dockingToleranceMm: values.dockingToleranceMm,
    dockingToleranceDeg: values.dockingToleranceDeg,
  };
}

function rangeText(limit: NumberLimit, unit: string): string {
  const digits = Math.max(limit.fractionDigits, 2);
  return `${number(limit.min, digits)}${unit} and ${number(limit.max, digits)}${unit}`;
}

const units: Partial<Record<NumberField, string>> = {
  detectionWindowDays: ' days',
  clearZoneAfterRuns: ' runs',
  healthGoodMin: ' %',
  healthWatchMin: ' %',
  agreementToleranceM: ' m',
  scannerMinReturnsPerDay: ' returns',
  retentionDays: ' days',
  remapDriveSpeedMps: ' m/s',
  remapSweepWidthM: ' m',
  remapSetupMinutes: ' min',
  remapMarginM: ' m',
  dockingToleranceMm: ' mm',
  dockingToleranceDeg: '°',
};

/** Returns the sentence for a number outside what the server accepts, or null when it is within. */
export function limitProblem(field: NumberField, value: number | null): string | null {
  const limit = SETTING_LIMITS[field];
  const unit = units[field] ?? '';
  if (value === null || !Number.isFinite(value)) {
    return field === 'detectionHour' ? 'Enter an hour from 0 to 23.' : `Enter a value between ${rangeText(limit, unit)}.`;
  }
  if (limit.whole && !Number.isInteger(value)) return `Enter a whole number between ${rangeText(limit, unit)}.`;
  if (value < limit.min || value > limit.max) {
    if (field === 'detectionHour') return 'The hour must lie from 0 (midnight) to 23.';
    return `Must lie between ${rangeText(limit, unit)}.`;
  }
  return null;
}

/**
 * Returns a sentence per field that the server would refuse; empty when the draft may be sent.
 * A rule that spans two fields is reported on the one of the pair that differs from `applied`
 * (the one the person just changed), like the server does; on the first of the pair when both or
 * neither changed.
 */
export function settingsProblems(draft: SettingsDraft, applied: SettingsValues): Partial<Record<DraftField, string>> {
  const problems: Partial<Record<DraftField, string>> = {};
  if (draft.timezone.trim().length === 0) problems.timezone = 'Choose the site’s time zone.';
  for (const field of Object.keys(SETTING_LIMITS) as NumberField[]) {
    const problem = limitProblem(field, draft[field]);
    if (problem) problems[field] = problem;
  }

  const good = draft.healthGoodMin;
  const watch = draft.healthWatchMin;
  if (!problems.healthGoodMin && !problems.healthWatchMin && (good as number) <= (watch as number)) {
    const onWatch = watch !== applied.healthWatchMin && good === applied.healthGoodMin;
    if (onWatch) problems.healthWatchMin = `“Watch” must start below “good” (${formatSetting('healthGoodMin', good as number)}).`;
    else problems.healthGoodMin = `“Good” must start above “watch” (${formatSetting('healthWatchMin', watch as number)}).`;
  }

  const window = draft.detectionWindowDays;
  const kept = draft.retentionDays;
  if (!problems.detectionWindowDays && !problems.retentionDays && (kept as number) < (window as number) + RETENTION_MARGIN_DAYS) {
    const least = (window as number) + RETENTION_MARGIN_DAYS;
    const onWindow = window !== applied.detectionWindowDays && kept === applied.retentionDays;
    if (onWindow) {
      problems.detectionWindowDays = `With ${formatSetting('retentionDays', kept as number)} of evidence kept, the window can be at most ${formatSetting('detectionWindowDays', (kept as number) - RETENTION_MARGIN_DAYS)}.`;
    } else {
      problems.retentionDays = `Keep at least ${least} days: the ${formatSetting('detectionWindowDays', window as number)} compared plus ${RETENTION_MARGIN_DAYS} for the health score.`;
    }
  }
  return problems;
}

/** Returns the fields whose draft differs from what applies now, in form order. */
export function changedFields(draft: SettingsDraft, timezone: string, applied: SettingsValues): DraftField[] {
  const changed: DraftField[] = draft.timezone !== timezone ? ['timezone'] : [];
  for (const field of EDITABLE_FIELDS) if (draft[field] !== applied[field]) changed.push(field);
  return changed;
}

/** Returns the PATCH body for a draft: only what differs from what applies now. Call only when settingsProblems found nothing. */
export function settingsChange(draft: SettingsDraft, timezone: string, applied: SettingsValues): SettingsChange {
  const change: Record<string, unknown> = {};
  for (const field of changedFields(draft, timezone, applied)) change[field] = draft[field];
  return change as SettingsChange;
}

const sentence = (text: string) => {
  const trimmed = text.trim();
  const capital = trimmed.charAt(0).toUpperCase() + trimmed.slice(1);
  return /[.!?]$/.test(capital) ? capital : `${capital}.`;
};

/** Returns the server's per-field messages from a 400's `details` as sentences, keyed by the form's fields; others are left out. */
export function fieldErrorsFrom(details: Record<string, unknown> | undefined): Partial<Record<DraftField, string>> {
  const raw = details?.fieldErrors;
  if (typeof raw !== 'object' || raw === null) return {};
  const known = new Set<string>(['timezone', ...EDITABLE_FIELDS]);
  const errors: Partial<Record<DraftField, string>> = {};
  for (const [field, messages] of Object.entries(raw as Record<string, unknown>)) {
    if (!known.has(field) || !Array.isArray(messages)) continue;
    const texts = messages.filter((m): m is string => typeof m === 'string' && m.trim().length > 0).map(sentence);
    if (texts.length > 0) errors[field as DraftField] = texts.join(' ');
  }
  return errors;
}

/** Returns one line per changed setting, "Label: before → after", in form order (for the saved message and the audit-minded reader). */
export function changeSummary(change: SettingsChange, timezone: string, before: SettingsValues): string[] {
  const lines: string[] = [];
  if (change.timezone !== undefined && change.timezone !== timezone) lines.push(`${SETTING_LABELS.timezone}: ${timezone} → ${change.timezone}`);
  for (const field of EDITABLE_FIELDS) {
    const next = change[field];
    if (next === undefined || next === before[field]) continue;
    lines.push(`${SETTING_LABELS[field]}: ${formatSetting(field, before[field])} → ${formatSetting(field, next)}`);
  }
  return lines;
}
