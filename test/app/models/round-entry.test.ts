import { describe, expect, it } from 'vitest';
import {
  convertText,
  displayUnits,
  entryUnits,
  findingsForPoint,
  groupPoints,
  notePointFor,
  notesStillNeeded,
  parseEntry,
  progressOf,
} from '../../../src/app/models/round-entry';
import { toSI } from '../../../src/calc';
import { demoConfig } from '../../../src/demo';
import type { CheckPoint, Finding, Reading } from '../../../src/schema';

const config = demoConfig();
const morning = config.routes.find((r) => r.id === 'morning');
const point = (id: string) => morning?.points.find((p) => p.id === id) as CheckPoint;
const BARO = 90_800;

describe('groupPoints', () => {
  it('should keep the route order and group consecutive points by machine and stage', () => {
    const groups = groupPoints(config, morning as NonNullable<typeof morning>);
    expect(groups.slice(0, 3).map((g) => g.title)).toEqual([
      'K-101 · stage 1',
      'K-101 · stage 2',
      'K-101 · frame, bearings, lube oil and checks',
    ]);
    expect(groups.flatMap((g) => g.points.map((p) => p.id))).toEqual(morning?.points.map((p) => p.id));
  });
});

describe('parseEntry', () => {
  it('should keep the text exactly as typed and convert with the site barometer', () => {
    // source: definition of gauge pressure (absolute = gauge + barometric); 1 bar = 100 kPa exactly
    const parsed = parseEntry(point('K-101-S1-PS'), ' 3.2 ', 'barg', BARO);
    expect(parsed).toEqual({ ok: true, entered: { text: '3.2', unit: 'barg' }, valueSI: 320_000 + BARO });
  });

  it('should accept a decimal comma', () => {
    const parsed = parseEntry(point('K-101-S1-PS'), '3,2', 'barg', BARO);
    expect(parsed.ok && parsed.valueSI).toBeCloseTo(320_000 + BARO, 6);
  });

  it('should say what to type instead of anything that is not a reading', () => {
    expect(parseEntry(point('K-101-S1-PS'), '', 'barg', BARO)).toEqual({ ok: false, message: 'Enter the reading.' });
    expect(parseEntry(point('K-101-S1-PS'), '3.2 bar', 'barg', BARO)).toEqual({
      ok: false,
      message: 'Enter a number, like 12.5.',
    });
    const vacuum = parseEntry(point('K-101-S1-PS'), '-5', 'barg', BARO);
    expect(vacuum.ok).toBe(false);
    expect(!vacuum.ok && vacuum.message).toMatch(/below full vacuum at this site/);
    expect(parseEntry(point('K-101-LO-LVL'), '120', null, BARO)).toEqual({
      ok: false,
      message: 'Enter a value from 0 to 100 %.',
    });
  });

  it('should take yes/no and choices only from their options', () => {
    expect(parseEntry(point('K-101-LEAK'), 'no', null, BARO)).toEqual({
      ok: true,
      entered: { text: 'no', unit: null },
      valueSI: null,
    });
    expect(parseEntry(point('K-101-LEAK'), 'maybe', null, BARO).ok).toBe(false);
    expect(parseEntry(point('K-101-FAN'), 'one stopped', null, BARO).ok).toBe(true);
    expect(parseEntry(point('K-101-FAN'), 'broken', null, BARO)).toEqual({
      ok: false,
      message: 'Choose one of: all running, one stopped, several stopped.',
    });
  });
});

describe('units', () => {
  it('should offer the gauge units of the same quantity', () => {
    expect(entryUnits(point('K-101-S1-PS')).map((u) => u.id)).toEqual([
      'barg',
      'psig',
      'kPag',
      'kgcm2g',
      'MPag',
      'bara',
      'psia',
      'kPaa',
    ]);
    expect(entryUnits(point('K-101-MB1-T')).map((u) => u.id)).toEqual(['degC', 'degF', 'K']);
    expect(entryUnits(point('K-101-LEAK'))).toEqual([]);
  });

  // source: 1 psi = 6.894 757 293 168 kPa (NIST SP 811); 3.2 barg at 90.8 kPa barometer = 46.41 psig
  it('should convert a value when the unit is switched', () => {
    expect(convertText(toSI(3.2, 'barg', { barometricPa: BARO }), 'psig', BARO)).toBe('46.41');
  });

  it('should show computed values in the site system', () => {
    expect(displayUnits(config)).toEqual({ pressure: 'barg', temperature: 'degC', power: 'kW', volumeFlow: 'm3/h' });
    expect(displayUnits({ ...config, units: { system: 'US', overrides: { power: 'kW' } } })).toEqual({
      pressure: 'psig',
      temperature: 'degF',
      power: 'kW',
      volumeFlow: 'ft3/min',
    });
  });
});

const reading = (pointId: string, extra: Partial<Reading> = {}): Reading => ({
  id: '00000000-0000-4000-8000-000000000001',
  roundId: '00000000-0000-4000-8000-0000000000aa',
  pointId,
  at: '2026-03-01T06:00:00Z',
  entered: { text: '1', unit: null },
  valueSI: 1,
  ...extra,
});

const finding = (rule: Finding['rule'], severity: Finding['severity'], subject: Finding['subject']): Finding => ({
  key: `${rule}:${JSON.stringify(subject)}`,
  roundId: '00000000-0000-4000-8000-0000000000aa',
  rule,
  subject,
  severity,
  message: 'm',
  numbers: {},
  inputs: {},
});

describe('progress, findings beside points and notes', () => {
  it('should count done, skipped and remaining', () => {
    const readings = new Map([
      ['K-101-S1-PS', reading('K-101-S1-PS')],
      ['K-101-S1-TS', reading('K-101-S1-TS', { entered: null, valueSI: null, skipped: { reason: 'Gauge broken' } })],
    ]);
    expect(progressOf(morning as NonNullable<typeof morning>, readings)).toEqual({
      done: 1,
      skipped: 1,
      remaining: 146,
      total: 148,
    });
  });

  it('should put the valve cover finding beside the suspect cover and discharge findings beside their thermometer', () => {
    const covers = finding('valveCovers', 'alarm', {
      machineId: 'K-101',
      stageId: 'S1',
      cylinderId: 'C1',
      valvePositionId: 'C1-HE-S1',
    });
    const discharge = finding('dischargeTemperature', 'watch', { machineId: 'K-101', stageId: 'S1', cylinderId: 'C1' });
    const all = [covers, discharge];
    expect(findingsForPoint(point('K-101-C1-HE-S1-T'), all)).toEqual([covers]);
    expect(findingsForPoint(point('K-101-C1-HE-S2-T'), all)).toEqual([]);
    expect(findingsForPoint(point('K-101-C1-TD'), all)).toEqual([discharge]);
    expect(findingsForPoint(point('K-101-C2-TD'), all)).toEqual([]);
  });

  it('should ask for a note on every alarm or trip, on the point a person would explain it on', () => {
    const covers = finding('valveCovers', 'alarm', {
      machineId: 'K-101',
      stageId: 'S1',
      cylinderId: 'C1',
      valvePositionId: 'C1-HE-S1',
    });
    const rod = finding('rodLoad', 'trip', { machineId: 'K-101', stageId: 'S2', cylinderId: 'C3', throw: 3 });
    const watch = finding('limits', 'watch', { machineId: 'K-101', pointId: 'K-101-S1-PS' });
    expect(notePointFor(covers, config)).toBe('K-101-C1-HE-S1-T');
    expect(notePointFor(rod, config)).toBe('K-101-S2-PD');
    const readings = new Map([
      ['K-101-C1-HE-S1-T', reading('K-101-C1-HE-S1-T', { note: 'Cover hot to touch; told the shift lead.' })],
    ]);
    expect(notesStillNeeded([covers, rod, watch], readings, config).map((n) => n.pointId)).toEqual(['K-101-S2-PD']);
  });
});
