/**
 * Pure rules of round entry: how a route is grouped and walked, how typed text becomes a reading, which findings
 * belong beside which point, and which findings still need a note. No storage, no DOM: tested in Node.
 */
import { CalcError, fromSI, toSI, UNITS, type UnitInfo, unitInfo } from '../../calc';
import type { CheckPoint, Finding, Reading, Route, SiteConfig } from '../../schema';
import { POINT_QUANTITY } from '../../schema';

export interface PointGroup {
  key: string;
  title: string;
  machineId: string;
  points: CheckPoint[];
}

/** Consecutive points of one machine and stage form a group; the route's own order is kept. */
export function groupPoints(config: SiteConfig, route: Route): PointGroup[] {
  const groups: PointGroup[] = [];
  for (const point of route.points) {
    const section = point.stageId ?? 'frame';
    const key = `${point.machineId}/${section}`;
    const last = groups.at(-1);
    if (last && last.key === key) {
      last.points.push(point);
      continue;
    }
    const machine = config.machines.find((m) => m.id === point.machineId);
    const stage = machine?.stages.find((s) => s.id === point.stageId);
    const title = `${machine?.name ?? point.machineId} · ${stage ? `stage ${stage.index}` : 'frame, bearings, lube oil and checks'}`;
    groups.push({
      key: groups.some((g) => g.key === key) ? `${key}#${groups.length}` : key,
      title,
      machineId: point.machineId,
      points: [point],
    });
  }
  return groups;
}

/** Units a person may switch to for a point: the gauge kinds of the same quantity. */
export function entryUnits(point: CheckPoint): UnitInfo[] {
  const quantity = POINT_QUANTITY[point.kind];
  if (quantity === 'pressure') return ['barg', 'psig', 'kPag', 'kgcm2g', 'MPag', 'bara', 'psia', 'kPaa'].map(unitInfo);
  if (quantity === 'temperature') return ['degC', 'degF', 'K'].map(unitInfo);
  if (quantity === 'length' || quantity === 'power' || quantity === 'volumeFlow')
    return UNITS.filter((u) => u.quantity === quantity);
  return [];
}

/** The unit shown beside a numeric point that has none of the calculation room's units. */
export function plainUnit(point: CheckPoint): string | null {
  const quantity = POINT_QUANTITY[point.kind];
  if (quantity === 'percent') return '%';
  if (quantity === 'velocity') return 'mm/s';
  return null;
}

export function isNumeric(point: CheckPoint): boolean {
  return POINT_QUANTITY[point.kind] !== undefined;
}

export type ParsedEntry =
  | { ok: true; entered: NonNullable<Reading['entered']>; valueSI: number | null }
  | { ok: false; message: string };

/** Plausible ranges for the kinds without SI units (common practice). */
const PLAIN_RANGE: Record<string, [number, number]> = { percent: [0, 100], velocity: [0, 500] };

/**
 * Typed text to what is stored: the text exactly as typed, the unit shown, and the SI value. A comma is accepted as
 * the decimal mark. Anything that is not a possible reading gives a message that says what to type instead.
 */
export function parseEntry(point: CheckPoint, text: string, unit: string | null, barometricPa: number): ParsedEntry {
  const trimmed = text.trim();
  if (point.kind === 'yesNo') {
    if (trimmed !== 'yes' && trimmed !== 'no') return { ok: false, message: 'Answer yes or no.' };
    return { ok: true, entered: { text: trimmed, unit: null }, valueSI: null };
  }
  if (point.kind === 'choice') {
    if (!point.choices?.includes(trimmed))
      return { ok: false, message: `Choose one of: ${point.choices?.join(', ')}.` };
    return { ok: true, entered: { text: trimmed, unit: null }, valueSI: null };
  }
  if (point.kind === 'text') {
    if (trimmed.length === 0) return { ok: false, message: 'Write something, or skip the point with a reason.' };
    if (text.length > 500) return { ok: false, message: 'Keep it under 500 characters; use the note for more.' };
    return { ok: true, entered: { text, unit: null }, valueSI: null };
  }
  if (trimmed === '') return { ok: false, message: 'Enter the reading.' };
  const normalised = trimmed.includes('.') ? trimmed : trimmed.replace(',', '.');
  if (!/^[-+]?(\d+\.?\d*|\.\d+)$/.test(normalised)) return { ok: false, message: 'Enter a number, like 12.5.' };
  const value = Number(normalised);
  const quantity = POINT_QUANTITY[point.kind];
  if (quantity === 'percent' || quantity === 'velocity') {
    const [min, max] = PLAIN_RANGE[quantity] as [number, number];
    if (value < min || value > max)
      return { ok: false, message: `Enter a value from ${min} to ${max} ${plainUnit(point)}.` };
    return { ok: true, entered: { text: trimmed, unit: null }, valueSI: value };
  }
  if (!unit) return { ok: false, message: 'Choose the unit the gauge shows.' };
  try {
    const valueSI = toSI(value, unit, { barometricPa });
    return { ok: true, entered: { text: trimmed, unit: unit as NonNullable<Reading['entered']>['unit'] }, valueSI };
  } catch (error) {
    if (error instanceof CalcError) return { ok: false, message: error.message.replace(/^value = /, '') };
    throw error;
  }
}

/** A stored reading's value shown in another unit (for switching the unit of a field that already has a value). */
export function convertText(valueSI: number, unit: string, barometricPa: number): string {
  const value = fromSI(valueSI, unit, { barometricPa });
  const digits = Math.abs(value) >= 1000 ? 0 : Math.abs(value) >= 100 ? 1 : 2;
  return String(Number(value.toFixed(digits)));
}

export interface Progress {
  done: number;
  skipped: number;
  remaining: number;
  total: number;
}

export function progressOf(route: Route, readings: ReadonlyMap<string, Reading>): Progress {
  let done = 0;
  let skipped = 0;
  for (const point of route.points) {
    const reading = readings.get(point.id);
    if (!reading) continue;
    if (reading.skipped) skipped += 1;
    else done += 1;
  }
  return { done, skipped, remaining: route.points.length - done - skipped, total: route.points.length };
}

/** The findings shown beside one point: its own, and the engineering findings its reading feeds. */
export function findingsForPoint(point: CheckPoint, findings: readonly Finding[]): Finding[] {
  return findings.filter((finding) => {
    if (finding.subject.pointId === point.id) return true;
    if (finding.subject.machineId !== point.machineId) return false;
    switch (finding.rule) {
      case 'valveCovers':
        // Beside the suspect cover only; the stage panel shows every cover of the cylinder in one table.
        return point.kind === 'valveCoverTemperature' && finding.subject.valvePositionId === point.valvePositionId;
      case 'dischargeTemperature':
        return (
          point.role === 'dischargeTemperature' &&
          finding.subject.stageId === point.stageId &&
          finding.subject.cylinderId === point.cylinderId
        );
      default:
        return false;
    }
  });
}

/** The point whose note answers for a finding: the reading a person would explain it on. */
export function notePointFor(finding: Finding, config: SiteConfig): string | null {
  if (finding.subject.pointId) return finding.subject.pointId;
  const points = config.routes.flatMap((route) => route.points);
  const { machineId, stageId, cylinderId, valvePositionId } = finding.subject;
  const match = (test: (p: CheckPoint) => boolean) =>
    points.find((p) => p.machineId === machineId && test(p))?.id ?? null;
  switch (finding.rule) {
    case 'valveCovers':
      return (
        (valvePositionId && match((p) => p.valvePositionId === valvePositionId)) ||
        match((p) => p.cylinderId === cylinderId && p.kind === 'valveCoverTemperature')
      );
    case 'dischargeTemperature':
      return (
        match((p) => p.role === 'dischargeTemperature' && p.stageId === stageId && p.cylinderId === cylinderId) ??
        match((p) => p.role === 'dischargeTemperature' && p.stageId === stageId)
      );
    default:
      return (
        match((p) => p.role === 'dischargePressure' && p.stageId === stageId) ?? match((p) => p.stageId === stageId)
      );
  }
}

/** Findings beyond watch (alarm or trip) whose point has no note yet: the round cannot be finished until each has one. */
export function notesStillNeeded(
  findings: readonly Finding[],
  readings: ReadonlyMap<string, Reading>,
  config: SiteConfig,
): Array<{ finding: Finding; pointId: string | null }> {
  return findings
    .filter((finding) => finding.severity === 'alarm' || finding.severity === 'trip')
    .map((finding) => ({ finding, pointId: notePointFor(finding, config) }))
    .filter(({ pointId }) => {
      const note = pointId ? readings.get(pointId)?.note : undefined;
      return !note || note.trim().length === 0;
    });
}

/** Severity counts for the finish summary. */
export function severityCounts(findings: readonly Finding[]): Record<Finding['severity'], number> {
  const counts = { ok: 0, watch: 0, alarm: 0, trip: 0 };
  for (const finding of findings) counts[finding.severity] += 1;
  return counts;
}

/** Units for values the app computes (predicted temperatures, power, capacity), from the site's unit system. */
export function displayUnits(config: SiteConfig): {
  pressure: string;
  temperature: string;
  power: string;
  volumeFlow: string;
} {
  const us = config.units.system === 'US';
  const o = config.units.overrides;
  return {
    pressure: o.pressure ?? (us ? 'psig' : 'barg'),
    temperature: o.temperature ?? (us ? 'degF' : 'degC'),
    power: o.power ?? (us ? 'hp' : 'kW'),
    volumeFlow: o.volumeFlow ?? (us ? 'ft3/min' : 'm3/h'),
  };
}
