/**
 * CSV export of rounds, findings and the mechanic's log. Pure: text in, text out, no DOM and no storage; the screen
 * that offers the download turns the string into a file (UTF-8).
 *
 * Format (RFC 4180 §2): records end with CRLF (the last one too); a field holding a comma, a double quote, CR or LF is
 * put in double quotes and its double quotes are doubled; every other field is written as it is, spaces included.
 * The first record is the header, and a header names its unit in brackets when the column holds a number in one
 * unit, e.g. `value_si` beside `si_unit`, `run_hours (h)`, `wear_si (m)`.
 *
 * What a person entered is written exactly as entered (`entered_text`, `entered_unit`), beside the SI value the app
 * computed from it. Times are written as recorded (ISO 8601 with their zone).
 */

import { SI_UNIT, unitInfo } from '../../calc';
import type {
  BearingClearanceRecord,
  CheckPoint,
  Finding,
  LockoutAck,
  Reading,
  Review,
  RodDropRecord,
  Round,
  SiteConfig,
  ValveChange,
} from '../../schema';
import { POINT_QUANTITY } from '../../schema';

export type CsvField = string | number | null | undefined;

/** A time window: records at or after `from` and before `to` (ISO 8601, a date or a time with its zone). */
export interface CsvRange {
  from: string;
  to: string;
}

const CRLF = '\r\n';
const NEEDS_QUOTES = /[",\r\n]/;

function field(value: CsvField, row: number, column: number, name: string): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) {
      throw new Error(
        `CSV row ${row}, column ${column + 1} (${name}) is ${value}, which cannot be written as a number: ` +
          'pass a finite number, or null to leave the field empty',
      );
    }
    return String(value);
  }
  if (typeof value !== 'string') {
    throw new Error(
      `CSV row ${row}, column ${column + 1} (${name}) is a ${typeof value}: pass a string, a finite number or null`,
    );
  }
  return NEEDS_QUOTES.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

/**
 * CSV text per RFC 4180 §2: header first, CRLF after every record, quoting only where needed. Null and undefined
 * become empty fields; numbers are written with String(n), which gives the shortest text that reads back as the
 * same number. Throws on a non-finite number and on a row whose length differs from the header's (§2.4).
 */
export function toCsv(header: string[], rows: Array<Array<CsvField>>): string {
  if (header.length === 0) throw new Error('CSV header is empty: give at least one column name');
  const lines = [header.map((name, i) => field(name, 0, i, name)).join(',')];
  rows.forEach((row, index) => {
    if (row.length !== header.length) {
      throw new Error(
        `CSV row ${index + 1} has ${row.length} fields but the header has ${header.length}: ` +
          'give every row one field per header column (null for an empty one)',
      );
    }
    lines.push(row.map((value, i) => field(value, index + 1, i, header[i] ?? '')).join(','));
  });
  return lines.join(CRLF) + CRLF;
}

const RANGE_TEXT = /^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2}))?$/;

/** Parses a range to epoch ms, or throws saying which end is wrong and how to write it. */
export function parseRange(range: CsvRange): { fromMs: number; toMs: number } {
  const parse = (name: 'from' | 'to', text: unknown): number => {
    const ms = typeof text === 'string' && RANGE_TEXT.test(text) ? Date.parse(text) : Number.NaN;
    if (!Number.isFinite(ms)) {
      throw new Error(
        `range.${name} ${JSON.stringify(text)} is not a date or time: write it as ISO 8601, a date ` +
          '(2026-03-14, midnight UTC) or a time with its zone (2026-03-14T06:00:00Z or 2026-03-14T06:00:00+02:00)',
      );
    }
    return ms;
  };
  const fromMs = parse('from', range?.from);
  const toMs = parse('to', range?.to);
  if (fromMs >= toMs) {
    throw new Error(
      `range.from (${range.from}) must be before range.to (${range.to}): ` +
        'the range includes from and excludes to, so pick a later "to" or an earlier "from"',
    );
  }
  return { fromMs, toMs };
}

const within = (at: string, { fromMs, toMs }: { fromMs: number; toMs: number }) => {
  const ms = Date.parse(at);
  return ms >= fromMs && ms < toMs;
};

const byTime = <T>(time: (item: T) => string) => {
  return (a: T, b: T) => Date.parse(time(a)) - Date.parse(time(b));
};

/** The unit valueSI is in: from the unit entered, else from the kind of point. */
function siUnitOf(reading: Reading, point: CheckPoint | undefined): string | null {
  if (reading.valueSI === null) return null;
  const unit = reading.entered?.unit;
  const quantity = unit ? unitInfo(unit).quantity : point ? POINT_QUANTITY[point.kind] : undefined;
  if (quantity === 'pressure') return 'Pa (absolute)';
  if (quantity === 'percent') return '%';
  if (quantity === 'velocity') return 'mm/s';
  return quantity ? SI_UNIT[quantity] : null;
}

export const READINGS_HEADER = [
  'round_id',
  'route_id',
  'route_name',
  'started_by_id',
  'started_by',
  'point_id',
  'point_name',
  'machine_id',
  'reading_at',
  'entered_text',
  'entered_unit',
  'value_si',
  'si_unit',
  'skipped_reason',
  'note',
];

/**
 * One row per reading taken within [from, to), rounds in order of start and readings in the order given. Points
 * are looked up in every route of the configuration; a point the configuration no longer has keeps its id with an
 * empty name and machine. Readings of rounds not in `rounds` are left out.
 */
export function readingsCsv(
  rounds: Round[],
  readingsByRound: Map<string, Reading[]>,
  config: SiteConfig,
  range: CsvRange,
): string {
  const window = parseRange(range);
  const points = new Map<string, CheckPoint>();
  const routes = new Map<string, string>();
  for (const route of config.routes) {
    routes.set(route.id, route.name);
    for (const point of route.points) if (!points.has(point.id)) points.set(point.id, point);
  }
  const rows: CsvField[][] = [];
  for (const round of [...rounds].sort(byTime((r) => r.startedAt))) {
    for (const reading of readingsByRound.get(round.id) ?? []) {
      if (!within(reading.at, window)) continue;
      const point = points.get(reading.pointId);
      rows.push([
        round.id,
        round.routeId,
        routes.get(round.routeId),
        round.by.id,
        round.by.name,
        reading.pointId,
        point?.label,
        point?.machineId,
        reading.at,
        reading.entered?.text,
        reading.entered?.unit,
        reading.valueSI,
        siUnitOf(reading, point),
        reading.skipped?.reason,
        reading.note,
      ]);
    }
  }
  return toCsv(READINGS_HEADER, rows);
}

export const FINDINGS_HEADER = [
  'round_id',
  'round_started_at',
  'finding_key',
  'rule',
  'severity',
  'machine_id',
  'stage_id',
  'cylinder_id',
  'throw',
  'bearing_id',
  'valve_position_id',
  'point_id',
  'message',
  'review_disposition',
  'review_by_id',
  'review_by',
  'review_at',
  'review_comment',
];

/**
 * One row per finding of a round started within [from, to), with the latest review of that finding (latest by
 * `at`; on equal times the one later in `reviews`). Findings of rounds not in `rounds` are left out, since their
 * start is unknown.
 */
export function findingsCsv(findings: Finding[], rounds: Round[], reviews: Review[], range: CsvRange): string {
  const window = parseRange(range);
  const roundsById = new Map(rounds.map((round) => [round.id, round]));
  const latest = new Map<string, Review>();
  for (const review of reviews) {
    const key = `${review.roundId}\n${review.findingKey}`;
    const seen = latest.get(key);
    if (!seen || Date.parse(review.at) >= Date.parse(seen.at)) latest.set(key, review);
  }
  const chosen = findings
    .map((finding) => ({ finding, round: roundsById.get(finding.roundId) }))
    .filter((item): item is { finding: Finding; round: Round } => !!item.round && within(item.round.startedAt, window))
    .sort((a, b) => Date.parse(a.round.startedAt) - Date.parse(b.round.startedAt));
  const rows = chosen.map(({ finding, round }): CsvField[] => {
    const review = latest.get(`${finding.roundId}\n${finding.key}`);
    const s = finding.subject;
    return [
      round.id,
      round.startedAt,
      finding.key,
      finding.rule,
      finding.severity,
      s.machineId,
      s.stageId,
      s.cylinderId,
      s.throw,
      s.bearingId,
      s.valvePositionId,
      s.pointId,
      finding.message,
      review?.disposition,
      review?.by.id,
      review?.by.name,
      review?.at,
      review?.comment,
    ];
  });
  return toCsv(FINDINGS_HEADER, rows);
}

export interface MaintenanceRecords {
  valveChanges?: ValveChange[];
  bearingClearances?: BearingClearanceRecord[];
  rodDrops?: RodDropRecord[];
  lockoutAcks?: LockoutAck[];
}

export const MAINTENANCE_HEADER = [
  'kind',
  'id',
  'at',
  'machine_id',
  'by_id',
  'by',
  'lockout_ack_id',
  'valve_position_id',
  'reason',
  'removed_valve_id',
  'installed_valve_id',
  'as_found',
  'parts_fitted',
  'torque_text',
  'torque_unit',
  'torque_si (Nm)',
  'run_hours (h)',
  'bearing_id',
  'method',
  'cylinder_id',
  'entered_where',
  'entered_text',
  'entered_unit',
  'value_si (m)',
  'spec_min_si (m)',
  'spec_max_si (m)',
  'wear_limit_si (m)',
  'new_band_reading_si (m)',
  'wear_si (m)',
  'used_fraction',
  'result_status',
  'result_per_diameter',
  'result_message',
  'task_kind',
  'task_ref',
  'caution_set_id',
  'cautions_acknowledged',
  'notes',
];

type MaintenanceRow = Partial<Record<(typeof MAINTENANCE_HEADER)[number], CsvField>>;

const JOIN = '; ';

/**
 * One row per record within [from, to), oldest first, with a `kind` column: `valveChange`, `bearingClearance`,
 * `rodDrop` or `lockoutAck` (a lockout acknowledgement counts at its completion time; its person is `by`). A
 * bearing check's measurements share one row, their where/text/unit/SI values each joined with `; ` in the order
 * taken; so are a valve's as-found words and parts fitted.
 */
export function maintenanceCsv(records: MaintenanceRecords, range: CsvRange): string {
  const window = parseRange(range);
  const rows: Array<{ at: string; row: MaintenanceRow }> = [];
  for (const v of records.valveChanges ?? []) {
    rows.push({
      at: v.at,
      row: {
        kind: 'valveChange',
        id: v.id,
        at: v.at,
        machine_id: v.machineId,
        by_id: v.by.id,
        by: v.by.name,
        lockout_ack_id: v.lockoutAckId,
        valve_position_id: v.valvePositionId,
        reason: v.reason,
        removed_valve_id: v.removedValveId,
        installed_valve_id: v.installedValveId,
        as_found: v.asFound.join(JOIN),
        parts_fitted: v.partsFitted.join(JOIN),
        torque_text: v.capBoltTorque?.text,
        torque_unit: v.capBoltTorque?.unit,
        'torque_si (Nm)': v.capBoltTorque?.valueNm,
        'run_hours (h)': v.runHours,
        notes: v.notes,
      },
    });
  }
  for (const b of records.bearingClearances ?? []) {
    rows.push({
      at: b.at,
      row: {
        kind: 'bearingClearance',
        id: b.id,
        at: b.at,
        machine_id: b.machineId,
        by_id: b.by.id,
        by: b.by.name,
        lockout_ack_id: b.lockoutAckId,
        bearing_id: b.bearingId,
        method: b.method,
        entered_where: b.measurements.map((m) => m.where).join(JOIN),
        entered_text: b.measurements.map((m) => m.entered.text).join(JOIN),
        entered_unit: b.measurements.map((m) => m.entered.unit ?? '').join(JOIN),
        'value_si (m)': b.measurements.map((m) => String(m.valueM)).join(JOIN),
        'spec_min_si (m)': b.spec.minM,
        'spec_max_si (m)': b.spec.maxM,
        'wear_limit_si (m)': b.spec.wearLimitM,
        result_status: b.result.status,
        result_per_diameter: b.result.perDiameter,
        result_message: b.result.message,
        notes: b.notes,
      },
    });
  }
  for (const r of records.rodDrops ?? []) {
    rows.push({
      at: r.at,
      row: {
        kind: 'rodDrop',
        id: r.id,
        at: r.at,
        machine_id: r.machineId,
        by_id: r.by.id,
        by: r.by.name,
        cylinder_id: r.cylinderId,
        entered_text: r.entered.text,
        entered_unit: r.entered.unit,
        'value_si (m)': r.readingM,
        'new_band_reading_si (m)': r.newBandReadingM,
        'wear_si (m)': r.wearM,
        used_fraction: r.usedFraction,
        notes: r.notes,
      },
    });
  }
  for (const a of records.lockoutAcks ?? []) {
    rows.push({
      at: a.completedAt,
      row: {
        kind: 'lockoutAck',
        id: a.id,
        at: a.completedAt,
        machine_id: a.task.machineId,
        by_id: a.by.id,
        by: a.by.name,
        lockout_ack_id: a.id,
        task_kind: a.task.kind,
        task_ref: a.task.ref,
        caution_set_id: a.cautionSetId,
        cautions_acknowledged: a.acknowledgements.length,
      },
    });
  }
  const kept = rows.filter((item) => within(item.at, window)).sort(byTime((item) => item.at));
  return toCsv(
    MAINTENANCE_HEADER,
    kept.map(({ row }) => MAINTENANCE_HEADER.map((name) => row[name])),
  );
}
