import { describe, expect, expectTypeOf, it } from 'vitest';
import { demoHistory } from '../../src/demo';
import {
  describeIssues,
  Envelope,
  envelopeFor,
  LockoutAck,
  MAX_PHOTO_DATA_URL,
  parseEnvelope,
  Reading,
  RecordError,
  Round,
  type TypedEnvelope,
  ValveChange,
} from '../../src/schema';

const ROUND_ID = '6f1c2d3e-4a5b-4c6d-8e7f-901234567890';
const round = {
  id: ROUND_ID,
  siteName: 'Test site',
  routeId: 'morning',
  configVersion: 1,
  by: { id: 'operator', name: 'Op' },
  deviceId: 'tablet-1',
  startedAt: '2026-03-01T06:00:00Z',
  finishedAt: '2026-03-01T07:00:00Z',
  state: 'finished' as const,
};
const reading = {
  id: '0a1b2c3d-4e5f-4a6b-8c7d-8e9f0a1b2c3d',
  roundId: ROUND_ID,
  pointId: 'K-101-S1-PS',
  at: '2026-03-01T06:10:00Z',
  entered: { text: '3.2', unit: 'barg' as const },
  valueSI: 410_800,
};

function message(schema: { safeParse: (v: unknown) => { success: boolean; error?: unknown } }, value: unknown): string {
  const result = schema.safeParse(value);
  expect(result.success).toBe(false);
  return describeIssues(result.error as never);
}

describe('Round', () => {
  it('should need a finish time exactly when finished', () => {
    expect(Round.safeParse(round).success).toBe(true);
    expect(message(Round, { ...round, finishedAt: null })).toBe('finishedAt: a finished round has its finish time');
    expect(message(Round, { ...round, state: 'draft' })).toBe('finishedAt: a draft round has no finish time yet');
    expect(message(Round, { ...round, finishedAt: '2026-03-01T05:00:00Z' })).toBe(
      'finishedAt: must not be before startedAt',
    );
  });

  it('should refuse ids that are not device-made UUIDs and times without a zone', () => {
    expect(message(Round, { ...round, id: '42' })).toBe('id: must be a UUID generated on the device');
    expect(message(Round, { ...round, startedAt: '2026-03-01 06:00' })).toMatch(
      /^startedAt: must be an ISO 8601 time with a zone/,
    );
  });
});

describe('Reading', () => {
  it('should keep what was entered, exactly, with its unit', () => {
    expect(Reading.parse(reading).entered).toEqual({ text: '3.2', unit: 'barg' });
  });

  it('should be either a value or skipped with a reason', () => {
    expect(
      Reading.safeParse({ ...reading, entered: null, valueSI: null, skipped: { reason: 'Machine stopped' } }).success,
    ).toBe(true);
    expect(message(Reading, { ...reading, skipped: { reason: 'x' } })).toBe('skipped: a skipped reading has no value');
    expect(message(Reading, { ...reading, entered: null, valueSI: null })).toBe(
      'entered: a reading has a value, or is skipped with a reason',
    );
    expect(message(Reading, { ...reading, entered: null, valueSI: null, skipped: { reason: '  ' } })).toBe(
      'skipped.reason: say why the point was skipped',
    );
  });

  // source: absolute pressure cannot be zero or negative; absolute temperature cannot be at or below 0 K
  it('should refuse physically impossible SI values for the entered unit', () => {
    expect(message(Reading, { ...reading, valueSI: -5 })).toMatch(/^valueSI: -5 is not a possible pressure/);
    expect(message(Reading, { ...reading, entered: { text: '-300', unit: 'degC' }, valueSI: -26.85 })).toMatch(
      /not a possible temperature/,
    );
  });

  it('should refuse unknown units, long notes and unknown fields', () => {
    expect(message(Reading, { ...reading, entered: { text: '3', unit: 'atm' } })).toMatch(
      /^entered\.unit: must be one of/,
    );
    expect(message(Reading, { ...reading, note: 'x'.repeat(4001) })).toBe('note: must be at most 4000 characters');
    expect(message(Reading, { ...reading, colour: 'red' })).toMatch(/colour/);
  });
});

describe('LockoutAck', () => {
  const ack = {
    id: '1a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d',
    task: { kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-D2' },
    cautionSetId: 'open-machine',
    configVersion: 1,
    by: { id: 'mechanic', name: 'Mech' },
    acknowledgements: [
      { cautionId: 'permit', at: '2026-03-01T09:00:00Z' },
      { cautionId: 'governs', at: '2026-03-01T09:01:00Z' },
    ],
    completedAt: '2026-03-01T09:02:00Z',
  };

  it('should refuse a caution acknowledged twice or after completion', () => {
    expect(LockoutAck.safeParse(ack).success).toBe(true);
    const twice = { ...ack, acknowledgements: [ack.acknowledgements[0], ack.acknowledgements[0]] };
    expect(message(LockoutAck, twice)).toBe('acknowledgements.1.cautionId: acknowledged twice');
    const late = { ...ack, completedAt: '2026-03-01T09:00:30Z' };
    expect(message(LockoutAck, late)).toBe('acknowledgements.1.at: is after completedAt');
  });
});

describe('parseEnvelope', () => {
  const meta = { author: 'operator', device: 'tablet-1', createdAt: '2026-03-01T07:00:00Z' };
  const body = { round, readings: [reading], findings: [] };

  it('should accept a finished round and type its body', () => {
    const envelope = parseEnvelope(envelopeFor('round', body, meta));
    expect(envelope.id).toBe(ROUND_ID);
    expect(envelope.type).toBe('round');
    expectTypeOf<TypedEnvelope<'round'>['body']['readings'][number]['valueSI']>().toEqualTypeOf<number | null>();
  });

  it('should name the body field that is wrong', () => {
    const bad = envelopeFor(
      'round',
      { ...body, readings: [{ ...reading, valueSI: 'high' as unknown as number }] },
      meta,
    );
    expect(() => parseEnvelope(bad)).toThrow(RecordError);
    expect(() => parseEnvelope(bad)).toThrow(/body\.readings\.0\.valueSI/);
  });

  it('should refuse draft rounds, readings of another round and an id that is not the record’s', () => {
    expect(() =>
      parseEnvelope(envelopeFor('round', { ...body, round: { ...round, state: 'draft', finishedAt: null } }, meta)),
    ).toThrow(/body\.round\.state: only finished rounds are sent/);
    const stranger = { ...reading, roundId: '7f1c2d3e-4a5b-4c6d-8e7f-901234567890' };
    expect(() => parseEnvelope(envelopeFor('round', { ...body, readings: [stranger] }, meta))).toThrow(
      /belongs to another round/,
    );
    expect(() => parseEnvelope({ ...envelopeFor('round', body, meta), id: reading.id })).toThrow(
      /differs from the record's own id/,
    );
  });

  it('should refuse unknown types and schema versions it cannot read', () => {
    expect(() => parseEnvelope({ ...envelopeFor('round', body, meta), type: 'invoice' })).toThrow(
      /^The record envelope is not valid: type/,
    );
    expect(() => parseEnvelope({ ...envelopeFor('round', body, meta), schema: 2 })).toThrow(
      /version 2 of round is not known here/,
    );
    expect(Envelope.safeParse({ ...envelopeFor('round', body, meta), extra: 1 }).success).toBe(false);
  });
});

describe('ValveChange photo', () => {
  const change = demoHistory({ end: '2026-11-30T00:00:00.000Z' }).valveChanges[0];
  // A 1 × 1 JPEG is still a JPEG: the data URL form is RFC 2397, base64 per RFC 4648 §4.
  const photo = {
    mediaType: 'image/jpeg' as const,
    dataUrl: `data:image/jpeg;base64,${Buffer.from([0xff, 0xd8, 0xff, 0xd9]).toString('base64')}`,
    widthPx: 1,
    heightPx: 1,
  };

  it('accepts a valve change with a downscaled photo, and one without', () => {
    expect(ValveChange.safeParse({ ...change, photo }).success).toBe(true);
    expect(ValveChange.safeParse(change).success).toBe(true);
  });

  it('refuses a photo that is not a base64 JPEG or WebP data URL, or too large, saying why', () => {
    expect(message(ValveChange, { ...change, photo: { ...photo, dataUrl: 'https://example.com/valve.jpg' } })).toMatch(
      /photo\.dataUrl.*base64 JPEG or WebP data URL/,
    );
    const huge = `data:image/jpeg;base64,${'A'.repeat(MAX_PHOTO_DATA_URL)}`;
    expect(message(ValveChange, { ...change, photo: { ...photo, dataUrl: huge } })).toMatch(/photo is too large/);
    expect(message(ValveChange, { ...change, photo: { ...photo, mediaType: 'image/gif' } })).toMatch(
      /photo\.mediaType/,
    );
  });
});
