import { apiRequest } from './client';

/** Drift verdict of a station: drifting (a step or trend beyond the thresholds), out of tolerance (no drift, but off), steady, or too few dockings. */
export type DriftState = 'drifting' | 'out_of_tolerance' | 'steady' | 'insufficient';
/** Where a tolerance comes from: the station's own, the site setting, or the product default. */
export type ToleranceSource = 'station' | 'site' | 'default';

/** Accuracy of a group of dockings: offsets in millimetres, headings in degrees, the share within tolerance 0–1. */
export interface AccuracyFigures {
  count: number;
  meanDxMm: number;
  meanDyMm: number;
  meanOffsetMm: number;
  p95RadialMm: number;
  meanYawDeg: number;
  p95YawDeg: number;
  withinShare: number;
}

/** The station model as the station page draws it: resolution in metres per cell, size in cells and metres, origin in the station frame. */
export interface StationModel {
  id: string;
  version: number;
  label: string;
  resolution: number;
  width: number;
  height: number;
  widthM: number;
  heightM: number;
  origin: { x: number; y: number; yaw: number };
  attachedAt: string | null;
}

/** One docking station as the stations list shows it. */
export interface DockingStation {
  id: string;
  siteId: string;
  name: string;
  createdAt: string;
  createdBy: { id: string; name: string } | null;
  tolerance: { positionMm: number; yawDeg: number; positionSource: ToleranceSource; yawSource: ToleranceSource; stationMm: number | null; stationDeg: number | null };
  model: StationModel | null;
  lastDockedAt: string | null;
  /** The last 7 days' accuracy against the current model, or null without dockings. */
  latest: AccuracyFigures | null;
  verdict: { state: DriftState; kind: 'step' | 'trend' | null; channel: 'position' | 'heading' | null; results: number; days: number; sentence: string };
}

/** A channel's drift figures: millimetres for position, degrees for heading. */
export interface ChannelDrift {
  unit: 'mm' | 'deg';
  tolerance: number;
  recentOffset: number | null;
  recentCount: number;
  state: 'drifting' | 'out_of_tolerance' | 'steady';
  finding: 'step' | 'trend' | null;
  step: { test: string; pValue: number; at: string; before: number[]; after: number[]; shift: number; offsetAfter: number; significant: boolean; relevant: boolean };
  trend: null | { test: string; pValue: number; slopesPerDay: number[]; speedPerDay: number; offsetNow: number; projected: number; crossingAt: string | null; days: number; significant: boolean; relevant: boolean };
}

/** One docking: time, robot, and the final offset in metres and radians; `currentModel` false for dockings against an earlier model. */
export interface DockingResult {
  t: string;
  robotId: string;
  dx: number;
  dy: number;
  dyaw: number;
  currentModel: boolean;
}

/** A station with its window of dockings, daily figures and drift figures. */
export interface DockingStationDetail extends DockingStation {
  window: { from: string; to: string; days: number; timezone: string };
  robots: { id: string; name: string }[];
  results: DockingResult[];
  resultsTruncated: boolean;
  earlierModelResults: number;
  daily: Array<{ day: string } & AccuracyFigures>;
  drift: {
    state: DriftState;
    kind: 'step' | 'trend' | null;
    channel: 'position' | 'heading' | null;
    sentence: string;
    results: number;
    days: number;
    thresholds: { alpha: number; minResults: number; relevantShare: number; horizonDays: number; recentDays: number };
    position: ChannelDrift | null;
    heading: ChannelDrift | null;
  };
}

/** The stations of a site and how many of them drift or sit out of tolerance. */
export interface StationList {
  stations: DockingStation[];
  summary: { total: number; drifting: number; outOfTolerance: number };
  windowDays: number;
}

const stationsPath = (siteId: string) => `/sites/${encodeURIComponent(siteId)}/stations`;
const stationPath = (siteId: string, stationId: string) => `${stationsPath(siteId)}/${encodeURIComponent(stationId)}`;

/** Returns a site's docking stations by name, each with its recent accuracy and verdict. */
export function listStations(siteId: string): Promise<StationList> {
  return apiRequest<StationList>(stationsPath(siteId));
}

/** Returns one station with its dockings of the window and its drift figures. */
export async function getStation(siteId: string, stationId: string): Promise<DockingStationDetail> {
  return (await apiRequest<{ station: DockingStationDetail }>(stationPath(siteId, stationId))).station;
}

/** Adds a station to a site; its name is what robots write in their docking results. */
export async function createStation(siteId: string, name: string): Promise<DockingStationDetail> {
  return (await apiRequest<{ station: DockingStationDetail }>(stationsPath(siteId), { method: 'POST', body: { name } })).station;
}

/** Renames a station; robots must use the new name from then on. */
export async function renameStation(siteId: string, stationId: string, name: string): Promise<DockingStationDetail> {
  return (await apiRequest<{ station: DockingStationDetail }>(stationPath(siteId, stationId), { method: 'PATCH', body: { name } })).station;
}

/** Makes a station map version of the site the station's current model. */
export async function attachStationModel(siteId: string, stationId: string, mapVersionId: string): Promise<DockingStationDetail> {
  return (await apiRequest<{ station: DockingStationDetail }>(`${stationPath(siteId, stationId)}/model`, { method: 'PUT', body: { mapVersionId } })).station;
}

/** Sets a station's own tolerances (millimetres, degrees); null takes the site setting. */
export async function setStationTolerance(siteId: string, stationId: string, toleranceMm: number | null, toleranceDeg: number | null): Promise<DockingStationDetail> {
  return (await apiRequest<{ station: DockingStationDetail }>(`${stationPath(siteId, stationId)}/tolerance`, { method: 'PUT', body: { toleranceMm, toleranceDeg } })).station;
}
