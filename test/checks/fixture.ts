/**
 * A small test site built to reproduce the engineering reference's worked examples through the checks engine:
 * sea-level barometer, the pipeline gas of §2.4, one cylinder with the V1/R1 geometry and the valve positions and
 * readings of §4.4. Invented for tests.
 */
import { toSI } from '../../src/calc';
import { type Reading, SiteConfig } from '../../src/schema';

export const ROUND_ID = '11111111-2222-4333-8444-555555555555';
const C = (celsius: number) => toSI(celsius, 'degC');

const covers = [
  ['HE-S1', 'head', 'suction', 1],
  ['HE-S2', 'head', 'suction', 2],
  ['CE-S3', 'crank', 'suction', 3],
  ['CE-S4', 'crank', 'suction', 4],
  ['HE-D1', 'head', 'discharge', 1],
  ['HE-D2', 'head', 'discharge', 2],
  ['CE-D3', 'crank', 'discharge', 3],
  ['CE-D4', 'crank', 'discharge', 4],
] as const;

export const config = SiteConfig.parse({
  version: 3,
  name: 'Test site',
  publishedAt: '2026-01-01T00:00:00Z',
  barometer: { kind: 'fixed', pressurePa: 101_325 },
  units: { system: 'SI', overrides: {} },
  gasStreams: [
    {
      id: 'ng',
      name: 'Pipeline gas',
      composition: {
        methane: 0.9,
        ethane: 0.05,
        propane: 0.02,
        isobutane: 0.005,
        nbutane: 0.005,
        nitrogen: 0.01,
        carbonDioxide: 0.01,
      },
    },
  ],
  machines: [
    {
      id: 'M1',
      name: 'M1',
      frame: {
        strokeM: 0.14,
        connectingRodM: 0.35,
        ratedSpeedRpm: 900,
        ratedCompressionN: 200_000,
        ratedTensionN: 180_000,
        throws: [{ index: 1, reciprocatingMassKg: 110 }],
      },
      stages: [{ id: 'S1', index: 1, gasStreamId: 'ng', veMethod: 'empirical' }],
      cylinders: [
        {
          id: 'C1',
          stageId: 'S1',
          throw: 1,
          boreM: 0.25,
          rodM: 0.06,
          headClearance: 0.16,
          crankClearance: 0.19,
          headActive: true,
          crankActive: true,
          polytropicExponent: 1.28,
        },
      ],
      valvePositions: covers.map(([id, end, service, index]) => ({ id, cylinderId: 'C1', end, service, index })),
      bearings: [
        { id: 'MB2', kind: 'main', index: 2 },
        { id: 'MB3', kind: 'main', index: 3 },
      ],
      lubeOilPoints: [{ id: 'LO', name: 'Header' }],
    },
  ],
  routes: [
    {
      id: 'r',
      name: 'Test route',
      points: [
        {
          id: 'PS',
          label: 'Suction pressure',
          kind: 'pressure',
          role: 'suctionPressure',
          machineId: 'M1',
          stageId: 'S1',
          unit: 'bara',
        },
        {
          id: 'PD',
          label: 'Discharge pressure',
          kind: 'pressure',
          role: 'dischargePressure',
          machineId: 'M1',
          stageId: 'S1',
          unit: 'bara',
          limits: { highWatch: 70e5, highAlarm: 80e5, highTrip: 85e5 },
        },
        {
          id: 'TS',
          label: 'Suction temperature',
          kind: 'temperature',
          role: 'suctionTemperature',
          machineId: 'M1',
          stageId: 'S1',
          unit: 'degC',
        },
        {
          id: 'TD',
          label: 'Discharge temperature',
          kind: 'temperature',
          role: 'dischargeTemperature',
          machineId: 'M1',
          stageId: 'S1',
          unit: 'degC',
          limits: { highWatch: C(110), highAlarm: C(125) },
        },
        ...covers.map(([id]) => ({
          id: `V-${id}`,
          label: `Cover ${id}`,
          kind: 'valveCoverTemperature',
          machineId: 'M1',
          stageId: 'S1',
          cylinderId: 'C1',
          valvePositionId: id,
          unit: 'degC',
        })),
        {
          id: 'OIL',
          label: 'Oil supply',
          kind: 'temperature',
          role: 'oilSupplyTemperature',
          machineId: 'M1',
          lubeOilPointId: 'LO',
          unit: 'degC',
        },
        {
          id: 'MB2-T',
          label: 'Main bearing 2',
          kind: 'bearingTemperature',
          role: 'bearing',
          machineId: 'M1',
          bearingId: 'MB2',
          unit: 'degC',
        },
        {
          id: 'MB3-T',
          label: 'Main bearing 3',
          kind: 'bearingTemperature',
          role: 'bearing',
          machineId: 'M1',
          bearingId: 'MB3',
          unit: 'degC',
        },
        {
          id: 'LEAK',
          label: 'Gas smell?',
          kind: 'yesNo',
          machineId: 'M1',
          expected: { answer: 'no', otherwise: 'alarm' },
        },
        { id: 'LVL', label: 'Oil level', kind: 'level', machineId: 'M1', limits: { lowAlarm: 30, lowWatch: 40 } },
      ],
    },
  ],
});

let counter = 0;
/** A reading as the tablet stores it: the text as typed, its unit, and the SI value. */
export function reading(
  pointId: string,
  text: string,
  unit: string | null,
  at = '2026-03-01T08:00:00Z',
  roundId = ROUND_ID,
): Reading {
  counter += 1;
  const id = `00000000-0000-4000-8000-${counter.toString().padStart(12, '0')}`;
  const valueSI =
    unit === null
      ? Number.isNaN(Number(text))
        ? null
        : Number(text)
      : toSI(Number(text), unit, { barometricPa: 101_325 });
  return { id, roundId, pointId, at, entered: { text, unit: unit as never }, valueSI };
}
