/**
 * CSV export. The format is checked against RFC 4180 §2 and by reading the output back with papaparse (a reference
 * CSV parser from the npm registry); the records are the invented demo history (src/demo). Unit factors are checked
 * against NIST SP 811 (2008) appendix B and the SI definition of the degree Celsius.
 */
import fc from 'fast-check';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import {
  FINDINGS_HEADER,
  findingsCsv,
  MAINTENANCE_HEADER,
  maintenanceCsv,
  READINGS_HEADER,
  readingsCsv,
  toCsv,
} from '../../../src/app/models/csv';
import { demoHistory } from '../../../src/demo';
import { type Reading, Review, RodDropRecord } from '../../../src/schema';

const END = '2026-11-30T00:00:00.000Z';
const DAYS = 90;
const history = demoHistory({ end: END, days: DAYS });
const rounds = history.rounds.map((r) => r.round);
const readingsByRound = new Map(history.rounds.map((r) => [r.round.id, r.readings]));
const allReadings = history.rounds.flatMap((r) => r.readings);
const allFindings = history.rounds.flatMap((r) => r.findings);
const WHOLE = { from: '2000-01-01', to: '2100-01-01' };

/** Parse with papaparse, CRLF given explicitly (RFC 4180 §2.1); returns the records without the empty tail. */
function parse(text: string): string[][] {
  const result = Papa.parse<string[]>(text, { newline: '\r\n', delimiter: ',', skipEmptyLines: false });
  expect(result.errors).toEqual([]);
  // RFC 4180 §2.2: the last record ends with a line break, which papaparse reads as one trailing empty line.
  expect(result.data.at(-1)).toEqual(['']);
  return result.data.slice(0, -1);
}

const column = (header: readonly string[], name: string) => {
  const index = header.indexOf(name);
  if (index < 0) throw new Error(`no column ${name}`);
  return index;
};

describe('toCsv (RFC 4180 §2)', () => {
  it('writes a header record and ends every record with CRLF', () => {
    // source: RFC 4180 §2.1 (CRLF line break), §2.2 (last record may end with one; we always write it), §2.3 (header)
    expect(toCsv(['a', 'b'], [['x', 'y']])).toBe('a,b\r\nx,y\r\n');
    expect(toCsv(['a'], [])).toBe('a\r\n');
  });

  it('quotes a field holding a comma, double quote, CR or LF, and doubles its quotes', () => {
    // source: RFC 4180 §2.6 (fields with line breaks, double quotes and commas are enclosed in double quotes)
    // source: RFC 4180 §2.7 (a double quote inside a quoted field is escaped by another double quote)
    expect(toCsv(['f'], [['a,b']])).toBe('f\r\n"a,b"\r\n');
    expect(toCsv(['f'], [['say "hi"']])).toBe('f\r\n"say ""hi"""\r\n');
    expect(toCsv(['f'], [['line1\r\nline2']])).toBe('f\r\n"line1\r\nline2"\r\n');
    expect(toCsv(['f'], [['cr\ronly']])).toBe('f\r\n"cr\ronly"\r\n');
    expect(toCsv(['f'], [['lf\nonly']])).toBe('f\r\n"lf\nonly"\r\n');
    expect(toCsv(['f'], [['"']])).toBe('f\r\n""""\r\n');
  });

  it('keeps spaces and writes other text unquoted', () => {
    // source: RFC 4180 §2.4 (spaces are part of a field and should not be ignored); §2.5 (quotes are optional)
    expect(toCsv(['a', 'b'], [[' 12.4 ', '°C ünïcode']])).toBe('a,b\r\n 12.4 ,°C ünïcode\r\n');
  });

  it('writes null and undefined as empty fields and numbers with String(n)', () => {
    // source: ECMAScript Number::toString gives the shortest text that reads back as the same number
    expect(toCsv(['a', 'b', 'c', 'd'], [[null, undefined, 0.1 + 0.2, 1e-7]])).toBe(
      'a,b,c,d\r\n,,0.30000000000000004,1e-7\r\n',
    );
    expect(Number('0.30000000000000004')).toBe(0.1 + 0.2);
  });

  it('refuses a number that is not finite, naming the row and column', () => {
    expect(() => toCsv(['a', 'value_si'], [['x', Number.NaN]])).toThrow(
      /row 1, column 2 \(value_si\) is NaN.*pass a finite number, or null/,
    );
    expect(() => toCsv(['a'], [[Number.POSITIVE_INFINITY]])).toThrow(/Infinity/);
    expect(() => toCsv(['a'], [[Number.NEGATIVE_INFINITY]])).toThrow(/-Infinity/);
  });

  it('refuses a row with the wrong number of fields and an empty header', () => {
    // source: RFC 4180 §2.4 (each line should contain the same number of fields throughout the file)
    expect(() => toCsv(['a', 'b'], [['x']])).toThrow(/row 1 has 1 fields but the header has 2/);
    expect(() => toCsv([], [])).toThrow(/header is empty/);
  });

  it('reads back unchanged with papaparse for any text', () => {
    const text = fc.string({ unit: fc.constantFrom('a', ' ', ',', '"', '\r', '\n', 'é', '😀', ';', '0') });
    fc.assert(
      fc.property(fc.array(fc.tuple(text, text, fc.double({ noNaN: true, noDefaultInfinity: true }))), (rows) => {
        const parsed = parse(toCsv(['a', 'b', 'n'], rows));
        expect(parsed[0]).toEqual(['a', 'b', 'n']);
        expect(parsed.slice(1).map(([a, b, n]) => [a, b, Number(n)])).toEqual(
          // String(-0) is "0" (ECMAScript Number::toString), so -0 reads back as 0.
          rows.map(([a, b, n]) => [a, b, Object.is(n, -0) ? 0 : n]),
        );
      }),
      { numRuns: 300 },
    );
  });
});

describe('readingsCsv', () => {
  it('gives one row per demo reading that reads back with papaparse exactly as entered', () => {
    // A note with every character RFC 4180 §2.6 quotes, on a copy of the first reading.
    const first = allReadings[0] as Reading;
    const noted: Reading = { ...first, note: 'gauge "B", re-read\r\nafter tapping' };
    const byRound = new Map(readingsByRound);
    byRound.set(first.roundId, [noted, ...(readingsByRound.get(first.roundId) ?? []).slice(1)]);

    const [header, ...rows] = parse(readingsCsv(rounds, byRound, history.config, WHOLE));
    expect(header).toEqual(READINGS_HEADER);
    expect(rows).toHaveLength(allReadings.length);
    const byId = new Map(allReadings.map((r) => [`${r.roundId}/${r.pointId}/${r.at}`, r]));
    const at = (name: string) => column(READINGS_HEADER, name);
    for (const row of rows) {
      const reading = byId.get(`${row[at('round_id')]}/${row[at('point_id')]}/${row[at('reading_at')]}`);
      expect(reading).toBeDefined();
      expect(row[at('entered_text')]).toBe(reading?.entered?.text ?? '');
      expect(row[at('entered_unit')]).toBe(reading?.entered?.unit ?? '');
      const si = row[at('value_si')] as string;
      expect(si === '' ? null : Number(si)).toBe(reading?.valueSI);
    }
    const firstRow = rows.find((row) => row[at('note')] !== '');
    expect(firstRow?.[at('note')]).toBe('gauge "B", re-read\r\nafter tapping');
    expect(firstRow?.[at('route_name')]).toBe(history.config.routes.find((r) => r.id === 'morning')?.name);
    expect(firstRow?.[at('started_by')]).toBe(rounds[0]?.by.name);
    // Skipped readings keep their reason and have neither value nor unit.
    const skipped = rows.filter((row) => row[at('skipped_reason')] !== '');
    expect(skipped).toHaveLength(allReadings.filter((r) => r.skipped).length);
    for (const row of skipped)
      expect([row[at('entered_text')], row[at('value_si')], row[at('si_unit')]]).toEqual(['', '', '']);
  });

  it('names the SI unit of each value, consistent with the unit definitions', () => {
    const [, ...rows] = parse(readingsCsv(rounds, readingsByRound, history.config, WHOLE));
    const at = (name: string) => column(READINGS_HEADER, name);
    const pick = (unit: string) => rows.filter((row) => row[at('entered_unit')] === unit);
    const value = (row: string[]) => Number(row[at('value_si')]);
    const entered = (row: string[]) => Number(row[at('entered_text')]);

    for (const row of pick('degC')) {
      expect(row[at('si_unit')]).toBe('K');
      // source: SI Brochure 9th ed. §2.3.1: t/°C = T/K − 273.15
      expect(value(row)).toBeCloseTo(entered(row) + 273.15, 9);
    }
    for (const row of pick('degF')) {
      expect(row[at('si_unit')]).toBe('K');
      // source: NIST SP 811 (2008) B.8: T/K = (t/°F + 459.67)/1.8
      expect(value(row)).toBeCloseTo((entered(row) + 459.67) / 1.8, 9);
    }
    // A gauge pressure is stored absolute: the same site barometric pressure is added to every one.
    const barg = pick('barg');
    const psig = pick('psig');
    expect(barg.length).toBeGreaterThan(0);
    expect(psig.length).toBeGreaterThan(0);
    // source: NIST SP 811 (2008) B.8: 1 bar = 1e5 Pa; 1 psi = 6.894 757 293 168 E+03 Pa
    const baro = barg.map((row) => value(row) - entered(row) * 1e5);
    const baroPsi = psig.map((row) => value(row) - entered(row) * 6894.757293168);
    for (const b of [...baro, ...baroPsi]) expect(b).toBeCloseTo(baro[0] as number, 4);
    for (const row of [...barg, ...psig]) expect(row[at('si_unit')]).toBe('Pa (absolute)');
  });

  it('includes a reading at `from` and leaves out one at `to` (a half-open range)', () => {
    const target = allReadings[500] as Reading;
    const next = new Date(Date.parse(target.at) + 1).toISOString();
    const count = (from: string, to: string) =>
      parse(readingsCsv(rounds, readingsByRound, history.config, { from, to })).length - 1;
    const inside = allReadings.filter((r) => r.at === target.at).length;
    expect(count(target.at, next)).toBe(inside);
    const earlier = new Date(Date.parse(target.at) - 1).toISOString();
    expect(count(earlier, target.at)).toBe(allReadings.filter((r) => r.at === earlier).length);

    const from = '2026-10-01T00:00:00Z';
    const to = '2026-10-08T00:00:00+02:00';
    const expected = allReadings.filter(
      (r) => Date.parse(r.at) >= Date.parse(from) && Date.parse(r.at) < Date.parse(to),
    );
    expect(expected.length).toBeGreaterThan(0);
    expect(count(from, to)).toBe(expected.length);
  });

  it('refuses a range it cannot read or that is empty, saying how to write it', () => {
    const call = (range: { from: string; to: string }) => () =>
      readingsCsv(rounds, readingsByRound, history.config, range);
    expect(call({ from: 'yesterday', to: END })).toThrow(/range\.from "yesterday" is not a date.*ISO 8601/);
    expect(call({ from: END, to: '2026-13-45' })).toThrow(/range\.to "2026-13-45" is not a date/);
    expect(call({ from: END, to: '2026-11-30T00:00:00' })).toThrow(
      /range\.to "2026-11-30T00:00:00" is not a date.*a time with its zone/,
    );
    expect(call({ from: END, to: END })).toThrow(/range\.from .* must be before range\.to/);
    expect(call({ from: '2026-12-01', to: '2026-11-01' })).toThrow(/must be before range\.to/);
  });
});

describe('findingsCsv', () => {
  it('lists the findings of rounds started in range with the latest review of each', () => {
    const roundWithFindings = history.rounds.find((r) => r.findings.length > 0);
    const finding = roundWithFindings?.findings[0];
    if (!roundWithFindings || !finding) throw new Error('demo has no finding');
    const review = (at: string, disposition: Review['disposition'], comment: string) =>
      Review.parse({
        id: crypto.randomUUID(),
        findingKey: finding.key,
        roundId: finding.roundId,
        by: { id: 'supervisor', name: 'S. Reviewer' },
        disposition,
        comment,
        at,
      });
    const start = Date.parse(roundWithFindings.round.startedAt);
    const later = review(new Date(start + 7_200_000).toISOString(), 'actionRaised', 'work order, "C3" valve; check');
    const earlier = review(new Date(start + 3_600_000).toISOString(), 'monitor', 'watch it');
    // Given newest first, so the latest is chosen by `at`, not by position.
    const from = roundWithFindings.round.startedAt;
    const to = new Date(start + 86_400_000).toISOString();
    const [header, ...rows] = parse(findingsCsv(allFindings, rounds, [later, earlier], { from, to }));
    expect(header).toEqual(FINDINGS_HEADER);

    const inRange = new Set(
      rounds
        .filter((r) => Date.parse(r.startedAt) >= start && Date.parse(r.startedAt) < Date.parse(to))
        .map((r) => r.id),
    );
    expect(rows).toHaveLength(allFindings.filter((f) => inRange.has(f.roundId)).length);
    const at = (name: string) => column(FINDINGS_HEADER, name);
    const row = rows.find((r) => r[at('finding_key')] === finding.key && r[at('round_id')] === finding.roundId);
    expect(row?.[at('review_disposition')]).toBe('actionRaised');
    expect(row?.[at('review_comment')]).toBe('work order, "C3" valve; check');
    expect(row?.[at('review_at')]).toBe(later.at);
    expect(row?.[at('review_by')]).toBe('S. Reviewer');
    expect(row?.[at('message')]).toBe(finding.message);
    expect(row?.[at('machine_id')]).toBe(finding.subject.machineId);
    expect(row?.[at('round_started_at')]).toBe(roundWithFindings.round.startedAt);
    const unreviewed = rows.filter((r) => r[at('review_disposition')] === '');
    expect(unreviewed).toHaveLength(rows.length - 1);
  });
});

describe('maintenanceCsv', () => {
  const rodDrop = RodDropRecord.parse({
    id: '7d7c3f8e-3a55-4c1e-9f0e-2b7a4b1c9d10',
    machineId: 'K-101',
    cylinderId: 'C1',
    at: '2026-10-20T10:00:00Z',
    by: { id: 'mechanic', name: 'M. Tester' },
    entered: { text: '0,35', unit: 'mm' },
    readingM: 0.00035,
    newBandReadingM: 0.0001,
    wearM: 0.00025,
    usedFraction: null,
    notes: 'dial on the "top" of the rod',
  });
  const records = {
    valveChanges: history.valveChanges,
    bearingClearances: history.bearingClearances,
    rodDrops: [rodDrop],
    lockoutAcks: history.lockoutAcks,
  };

  it('gives one row per record with its kind, as entered, oldest first', () => {
    const [header, ...rows] = parse(maintenanceCsv(records, WHOLE));
    expect(header).toEqual(MAINTENANCE_HEADER);
    const at = (name: string) => column(MAINTENANCE_HEADER, name);
    const kinds = rows.map((row) => row[at('kind')]);
    expect(kinds.filter((k) => k === 'valveChange')).toHaveLength(history.valveChanges.length);
    expect(kinds.filter((k) => k === 'bearingClearance')).toHaveLength(history.bearingClearances.length);
    expect(kinds.filter((k) => k === 'lockoutAck')).toHaveLength(history.lockoutAcks.length);
    expect(kinds.filter((k) => k === 'rodDrop')).toHaveLength(1);
    const times = rows.map((row) => Date.parse(row[at('at')] as string));
    expect(times).toEqual([...times].sort((a, b) => a - b));

    const valve = history.valveChanges[0];
    const valveRow = rows.find((row) => row[at('id')] === valve?.id);
    expect(valveRow?.[at('as_found')]).toBe(valve?.asFound.join('; '));
    expect(valveRow?.[at('parts_fitted')]).toBe(valve?.partsFitted.join('; '));
    expect(valveRow?.[at('torque_text')]).toBe(valve?.capBoltTorque?.text);
    expect(valveRow?.[at('torque_unit')]).toBe(valve?.capBoltTorque?.unit);
    expect(valveRow?.[at('lockout_ack_id')]).toBe(valve?.lockoutAckId);
    expect(Number(valveRow?.[at('run_hours (h)')])).toBe(valve?.runHours);
    const ackRow = rows.find((row) => row[at('kind')] === 'lockoutAck' && row[at('id')] === valve?.lockoutAckId);
    expect(ackRow?.[at('by')]).toBe(history.lockoutAcks.find((a) => a.id === valve?.lockoutAckId)?.by.name);

    const bearing = history.bearingClearances[0];
    const bearingRow = rows.find((row) => row[at('id')] === bearing?.id);
    expect(bearingRow?.[at('entered_text')]).toBe(bearing?.measurements.map((m) => m.entered.text).join('; '));
    expect(bearingRow?.[at('entered_unit')]).toBe(bearing?.measurements.map((m) => m.entered.unit).join('; '));
    expect(bearingRow?.[at('result_status')]).toBe(bearing?.result.status);
    expect(bearingRow?.[at('result_message')]).toBe(bearing?.result.message);
    expect(bearingRow?.[at('notes')]).toBe(bearing?.notes);

    const rodRow = rows.find((row) => row[at('kind')] === 'rodDrop');
    // The decimal comma is kept exactly as typed, quoted because it holds a comma (RFC 4180 §2.6).
    expect(rodRow?.[at('entered_text')]).toBe('0,35');
    expect(Number(rodRow?.[at('wear_si (m)')])).toBe(0.00025);
    expect(rodRow?.[at('notes')]).toBe('dial on the "top" of the rod');
  });

  it('keeps only the records within the range', () => {
    const failure = history.valveChanges.find((v) => v.reason === 'failure');
    if (!failure) throw new Error('demo has no failure');
    const ack = history.lockoutAcks.find((a) => a.id === failure.lockoutAckId);
    const from = ack?.completedAt as string;
    const to = new Date(Date.parse(failure.at) + 1).toISOString();
    const rows = parse(maintenanceCsv(records, { from, to })).slice(1);
    expect(rows.map((row) => [row[0], row[1]])).toEqual([
      ['lockoutAck', failure.lockoutAckId],
      ['valveChange', failure.id],
    ]);
    // `to` is excluded: ending at the change's own time leaves only the acknowledgement.
    expect(parse(maintenanceCsv(records, { from, to: failure.at })).slice(1)).toHaveLength(1);
    expect(() => maintenanceCsv(records, { from: to, to: from })).toThrow(/must be before range\.to/);
  });
});
