/**
 * The demo site: an invented gas gathering station with two 2-stage, 4-throw natural gas compressors and a small
 * hydrogen booster. Every name, number and person here is made up for demonstration; none describes a real plant.
 */
import { toSI } from '../calc';
import { type CheckPoint, SiteConfig } from '../schema';

import { DEMO_SITE_NAME } from './name';

export { DEMO_SITE_NAME };
export const DEMO_ELEVATION_M = 900;

/** Invented people, one per role; they sign in as their role name. */
export const DEMO_PEOPLE = {
  operator: { id: 'operator', name: 'Mara Oyelaran' },
  operator2: { id: 'operator2', name: 'Tomás Lindqvist' },
  mechanic: { id: 'mechanic', name: 'Priya Nandakumar' },
  supervisor: { id: 'supervisor', name: 'Dale Whitford' },
  admin: { id: 'admin', name: 'Sun-hee Park' },
} as const;

const C = (celsius: number) => toSI(celsius, 'degC');

/** Lockout cautions in our own words; the site procedure, permits and local codes govern. */
export const OPEN_MACHINE_CAUTIONS = {
  id: 'open-machine',
  title: 'Before opening a cylinder, valve cover, crankcase or bearing',
  cautions: [
    {
      id: 'permit',
      text: 'A work permit is issued and the job hazards are reviewed with the crew; the control room knows the unit is coming down.',
    },
    {
      id: 'energy-list',
      text: 'Every energy source on the isolation list is identified: driver, process gas, fuel or start gas, starting air, instrument air to unloaders and pockets, heaters, cooling water, lube oil pumps, stored spring energy.',
    },
    { id: 'stopped', text: 'The unit is shut down normally and confirmed stopped.' },
    {
      id: 'driver',
      text: 'The driver is isolated and locked (breaker racked out, or fuel blocked and ignition disabled) and a start attempt has proved it will not start.',
    },
    {
      id: 'process',
      text: 'Suction, discharge, recycle and vent valves are closed and locked, with the bleed between double blocks open; blinds are in where the site requires them.',
    },
    {
      id: 'pressure',
      text: 'Cylinders, bottles and piping are vented to flare or vent and read zero on the gauge and at an open vent; trapped pressure behind stuck unloaders or between valves is suspected until proved otherwise. Cover bolts are loosened evenly and the cover is broken free before the last bolts come out.',
    },
    {
      id: 'gas-test',
      text: 'Flammable and toxic gas is purged and a calibrated monitor shows oxygen, flammable gas and hydrogen sulfide within the site limits.',
    },
    { id: 'zero-energy', text: 'Zero energy is verified: try-start, gauges at zero, bleeds open, no flow.' },
    {
      id: 'crankshaft',
      text: 'The crankshaft is secured with the barring or flywheel lock: gas pressure on a piston or the weight of the rods can turn it.',
    },
    {
      id: 'hot',
      text: 'Hot surfaces are allowed to cool; the crankcase is cool before its doors are opened (hot oil mist can ignite when air gets in).',
    },
    {
      id: 'governs',
      text: "This list supports, and never replaces, the site's isolation procedure, its permits and local codes, which govern.",
    },
  ],
};

type PointInput = Omit<CheckPoint, 'role'> & { role?: CheckPoint['role'] };

interface MachineSpec {
  id: string;
  name: string;
  /** Gauge units on this machine. */
  pressureUnit: 'barg' | 'psig';
  temperatureUnit: 'degC' | 'degF';
}

function cylinderIds(machine: string, cylinders: string[]) {
  return cylinders.flatMap((cylinder) =>
    ['HE', 'CE'].flatMap((end) =>
      ['S', 'D'].flatMap((service) =>
        [1, 2].map((index) => ({
          id: `${cylinder}-${end}-${service}${index}`,
          cylinderId: cylinder,
          end: end === 'HE' ? ('head' as const) : ('crank' as const),
          service: service === 'S' ? ('suction' as const) : ('discharge' as const),
          index,
          machine,
        })),
      ),
    ),
  );
}

/** Check points of one 2-stage natural gas compressor. */
function gasCompressorPoints(spec: MachineSpec): { morning: PointInput[]; night: PointInput[] } {
  const m = spec.id;
  const p = spec.pressureUnit;
  const t = spec.temperatureUnit;
  const bar = (value: number) => toSI(value, 'barg', { barometricPa: 90_800 });
  const stage = (index: 1 | 2, ps: [number, number], pd: [number, number], tdMaxC: number): PointInput[] => [
    {
      id: `${m}-S${index}-PS`,
      label: `Stage ${index} suction pressure`,
      kind: 'pressure',
      role: 'suctionPressure',
      machineId: m,
      stageId: `S${index}`,
      unit: p,
      limits: { lowAlarm: bar(ps[0]), highAlarm: bar(ps[1]) },
    },
    {
      id: `${m}-S${index}-TS`,
      label: `Stage ${index} suction temperature`,
      kind: 'temperature',
      role: 'suctionTemperature',
      machineId: m,
      stageId: `S${index}`,
      unit: t,
      limits: { highWatch: C(45), highAlarm: C(55) },
    },
    {
      id: `${m}-S${index}-PD`,
      label: `Stage ${index} discharge pressure`,
      kind: 'pressure',
      role: 'dischargePressure',
      machineId: m,
      stageId: `S${index}`,
      unit: p,
      limits: { highWatch: bar(pd[0]), highAlarm: bar(pd[1]) },
    },
    ...(index === 1 ? ['C1', 'C2'] : ['C3', 'C4']).map(
      (cylinder): PointInput => ({
        id: `${m}-${cylinder}-TD`,
        label: `Cylinder ${cylinder} discharge temperature`,
        kind: 'temperature',
        role: 'dischargeTemperature',
        machineId: m,
        stageId: `S${index}`,
        cylinderId: cylinder,
        unit: t,
        limits: { highWatch: C(tdMaxC - 15), highAlarm: C(tdMaxC - 5), highTrip: C(tdMaxC) },
      }),
    ),
  ];
  const covers: PointInput[] = cylinderIds(m, ['C1', 'C2', 'C3', 'C4']).map((v) => ({
    id: `${m}-${v.id}-T`,
    label: `Valve cover ${v.id}`,
    kind: 'valveCoverTemperature',
    machineId: m,
    stageId: v.cylinderId === 'C1' || v.cylinderId === 'C2' ? 'S1' : 'S2',
    cylinderId: v.cylinderId,
    valvePositionId: v.id,
    unit: t,
  }));
  const mains: PointInput[] = [1, 2, 3, 4, 5].map((n) => ({
    id: `${m}-MB${n}-T`,
    label: `Main bearing ${n} temperature`,
    kind: 'bearingTemperature',
    role: 'bearing',
    machineId: m,
    bearingId: `MB${n}`,
    unit: t,
    limits: { highWatch: C(85), highAlarm: C(93), highTrip: C(104) },
  }));
  const crossheads: PointInput[] = [1, 2, 3, 4].map((n) => ({
    id: `${m}-XH${n}-T`,
    label: `Crosshead ${n} pin temperature (guide sensor)`,
    kind: 'bearingTemperature',
    role: 'bearing',
    machineId: m,
    bearingId: `XH${n}`,
    unit: t,
    limits: { highWatch: C(75), highAlarm: C(85), highTrip: C(95) },
  }));
  const oil: PointInput[] = [
    {
      id: `${m}-LO-T`,
      label: 'Lube oil supply temperature',
      kind: 'temperature',
      role: 'oilSupplyTemperature',
      machineId: m,
      lubeOilPointId: 'LO',
      unit: t,
      limits: { lowWatch: C(40), highWatch: C(65), highAlarm: C(70) },
    },
    {
      id: `${m}-LO-P`,
      label: 'Lube oil supply pressure',
      kind: 'pressure',
      role: 'oilPressure',
      machineId: m,
      lubeOilPointId: 'LO',
      unit: p,
      limits: { lowTrip: bar(1.7), lowAlarm: bar(2.1), lowWatch: bar(2.8) },
    },
    {
      id: `${m}-LO-LVL`,
      label: 'Crankcase oil level',
      kind: 'level',
      machineId: m,
      lubeOilPointId: 'LO',
      limits: { lowAlarm: 35, lowWatch: 45, highWatch: 85 },
    },
  ];
  const other: PointInput[] = [
    {
      id: `${m}-VIB`,
      label: 'Frame vibration, velocity',
      kind: 'vibration',
      machineId: m,
      limits: { highWatch: 9, highAlarm: 12 },
      hint: 'mm/s peak on the frame top, driver end.',
    },
    {
      id: `${m}-PACK`,
      label: 'Packing vent flow normal?',
      kind: 'yesNo',
      machineId: m,
      expected: { answer: 'yes', otherwise: 'watch' },
    },
    {
      id: `${m}-LEAK`,
      label: 'Gas smell or audible leak?',
      kind: 'yesNo',
      machineId: m,
      expected: { answer: 'no', otherwise: 'alarm' },
      hint: 'If yes: leave the area, raise the alarm per the site procedure.',
    },
    {
      id: `${m}-FAN`,
      label: 'Cooler fans',
      kind: 'choice',
      machineId: m,
      choices: ['all running', 'one stopped', 'several stopped'],
    },
    {
      id: `${m}-XH-INSP`,
      label: 'Crosshead guide inspection through the cover (weekly)',
      kind: 'yesNo',
      machineId: m,
      expected: { answer: 'yes', otherwise: 'watch' },
      lockout: { cautionSetId: 'open-machine' },
      hint: 'Only with the unit isolated: answer yes if the guide and shoes look normal.',
    },
    { id: `${m}-NOTE`, label: 'Anything else on this machine', kind: 'text', machineId: m },
  ];
  const coversOf = (stageId: string) => covers.filter((point) => point.stageId === stageId);
  // Each stage's covers follow its pressures and temperatures, as an operator walks from one cylinder to the next.
  const morning = [
    ...stage(1, [1.5, 4.5], [14, 15.5], 150),
    ...coversOf('S1'),
    ...stage(2, [9, 14.5], [48, 52], 150),
    ...coversOf('S2'),
    ...mains,
    ...crossheads,
    ...oil,
    ...other,
  ];
  const nightIds = new Set([
    `${m}-S1-PS`,
    `${m}-S1-TS`,
    `${m}-S1-PD`,
    `${m}-S2-PS`,
    `${m}-S2-TS`,
    `${m}-S2-PD`,
    `${m}-C1-TD`,
    `${m}-C2-TD`,
    `${m}-C3-TD`,
    `${m}-C4-TD`,
    `${m}-LO-T`,
    `${m}-LO-P`,
    `${m}-LEAK`,
  ]);
  for (const point of [...mains, ...crossheads]) nightIds.add(point.id);
  return { morning, night: morning.filter((point) => nightIds.has(point.id)) };
}

function gasCompressor(spec: MachineSpec) {
  const stage1 = {
    boreM: 0.33,
    rodM: 0.0635,
    headClearance: 0.18,
    crankClearance: 0.21,
    headActive: true,
    crankActive: true,
  };
  const stage2 = {
    boreM: 0.2,
    rodM: 0.0635,
    headClearance: 0.16,
    crankClearance: 0.19,
    headActive: true,
    crankActive: true,
  };
  return {
    id: spec.id,
    name: spec.name,
    service: 'field gas, 2 stages',
    frame: {
      strokeM: 0.14,
      connectingRodM: 0.35,
      ratedSpeedRpm: 1000,
      ratedCompressionN: 250_000,
      ratedTensionN: 220_000,
      throws: [1, 2, 3, 4].map((index) => ({ index, reciprocatingMassKg: index <= 2 ? 135 : 105 })),
    },
    stages: [
      {
        id: 'S1',
        index: 1,
        gasStreamId: 'field-gas',
        veMethod: 'empirical' as const,
        dischargeTemperatureLimitK: C(150),
      },
      {
        id: 'S2',
        index: 2,
        gasStreamId: 'field-gas',
        veMethod: 'empirical' as const,
        dischargeTemperatureLimitK: C(150),
      },
    ],
    cylinders: [
      {
        id: 'C1',
        stageId: 'S1',
        throw: 1,
        ...stage1,
        zSuction: 0.99,
        zDischarge: 0.98,
        rodDrop: { riderToPinM: 1.35, probeToPinM: 0.9, allowableWearM: 0.0012, newBandReadingM: 0 },
      },
      { id: 'C2', stageId: 'S1', throw: 2, ...stage1, zSuction: 0.99, zDischarge: 0.98 },
      { id: 'C3', stageId: 'S2', throw: 3, ...stage2, zSuction: 0.97, zDischarge: 0.94 },
      { id: 'C4', stageId: 'S2', throw: 4, ...stage2, zSuction: 0.97, zDischarge: 0.94 },
    ],
    valvePositions: cylinderIds(spec.id, ['C1', 'C2', 'C3', 'C4']).map(({ machine: _m, ...position }) => position),
    bearings: [
      ...[1, 2, 3, 4, 5].map((index) => ({
        id: `MB${index}`,
        kind: 'main' as const,
        index,
        journalDiameterM: 0.18,
        clearance: { specMinM: 0.00014, specMaxM: 0.0002, wearLimitM: 0.00024 },
        limits: { alarmK: C(93), tripK: C(104) },
      })),
      ...[1, 2, 3, 4].map((index) => ({
        id: `CP${index}`,
        kind: 'crankpin' as const,
        index,
        journalDiameterM: 0.15,
        clearance: { specMinM: 0.00012, specMaxM: 0.00017 },
      })),
      ...[1, 2, 3, 4].map((index) => ({
        id: `XH${index}`,
        kind: 'crossheadPin' as const,
        index,
        limits: { alarmK: C(85), tripK: C(95) },
      })),
    ],
    lubeOilPoints: [{ id: 'LO', name: 'Lube oil header after filter' }],
  };
}

function boosterPoints(): { morning: PointInput[]; night: PointInput[] } {
  const m = 'K-301';
  const bar = (value: number) => toSI(value, 'barg', { barometricPa: 90_800 });
  const morning: PointInput[] = [
    {
      id: `${m}-S1-PS`,
      label: 'Suction pressure',
      kind: 'pressure',
      role: 'suctionPressure',
      machineId: m,
      stageId: 'S1',
      unit: 'barg',
      limits: { lowAlarm: bar(20), highAlarm: bar(30) },
    },
    {
      id: `${m}-S1-TS`,
      label: 'Suction temperature',
      kind: 'temperature',
      role: 'suctionTemperature',
      machineId: m,
      stageId: 'S1',
      unit: 'degC',
      limits: { highWatch: C(40), highAlarm: C(50) },
    },
    {
      id: `${m}-S1-PD`,
      label: 'Discharge pressure',
      kind: 'pressure',
      role: 'dischargePressure',
      machineId: m,
      stageId: 'S1',
      unit: 'barg',
      limits: { highWatch: bar(64), highAlarm: bar(67) },
    },
    ...['C1', 'C2'].map(
      (cylinder): PointInput => ({
        id: `${m}-${cylinder}-TD`,
        label: `Cylinder ${cylinder} discharge temperature`,
        kind: 'temperature',
        role: 'dischargeTemperature',
        machineId: m,
        stageId: 'S1',
        cylinderId: cylinder,
        unit: 'degC',
        limits: { highWatch: C(125), highAlarm: C(130), highTrip: C(135) },
      }),
    ),
    ...cylinderIds(m, ['C1', 'C2']).map(
      (v): PointInput => ({
        id: `${m}-${v.id}-T`,
        label: `Valve cover ${v.id}`,
        kind: 'valveCoverTemperature',
        machineId: m,
        stageId: 'S1',
        cylinderId: v.cylinderId,
        valvePositionId: v.id,
        unit: 'degC',
      }),
    ),
    ...[1, 2, 3].map(
      (n): PointInput => ({
        id: `${m}-MB${n}-T`,
        label: `Main bearing ${n} temperature`,
        kind: 'bearingTemperature',
        role: 'bearing',
        machineId: m,
        bearingId: `MB${n}`,
        unit: 'degC',
        limits: { highWatch: C(85), highAlarm: C(93), highTrip: C(104) },
      }),
    ),
    {
      id: `${m}-LO-T`,
      label: 'Lube oil supply temperature',
      kind: 'temperature',
      role: 'oilSupplyTemperature',
      machineId: m,
      lubeOilPointId: 'LO',
      unit: 'degC',
      limits: { highWatch: C(65), highAlarm: C(70) },
    },
    {
      id: `${m}-LO-P`,
      label: 'Lube oil supply pressure',
      kind: 'pressure',
      role: 'oilPressure',
      machineId: m,
      lubeOilPointId: 'LO',
      unit: 'barg',
      limits: { lowAlarm: bar(2), lowWatch: bar(2.6) },
    },
    {
      id: `${m}-H2-DET`,
      label: 'Hydrogen detector reading normal?',
      kind: 'yesNo',
      machineId: m,
      expected: { answer: 'yes', otherwise: 'alarm' },
    },
    { id: `${m}-NOTE`, label: 'Anything else on the booster', kind: 'text', machineId: m },
  ];
  const nightIds = new Set([
    `${m}-S1-PS`,
    `${m}-S1-PD`,
    `${m}-S1-TS`,
    `${m}-C1-TD`,
    `${m}-C2-TD`,
    `${m}-LO-P`,
    `${m}-H2-DET`,
  ]);
  return { morning, night: morning.filter((point) => nightIds.has(point.id)) };
}

function booster() {
  const cylinder = {
    boreM: 0.09,
    rodM: 0.035,
    headClearance: 0.12,
    crankClearance: 0.15,
    headActive: true,
    crankActive: true,
  };
  return {
    id: 'K-301',
    name: 'K-301 hydrogen booster',
    service: 'hydrogen, 1 stage',
    frame: {
      strokeM: 0.1,
      connectingRodM: 0.3,
      ratedSpeedRpm: 740,
      ratedCompressionN: 60_000,
      ratedTensionN: 55_000,
      throws: [1, 2].map((index) => ({ index, reciprocatingMassKg: 38 })),
      reversalCriterion: { minDegrees: 30, minFraction: 0.05 },
    },
    stages: [
      {
        id: 'S1',
        index: 1,
        gasStreamId: 'hydrogen',
        veMethod: 'empirical' as const,
        veConstant: 96,
        dischargeTemperatureLimitK: C(135),
      },
    ],
    cylinders: [
      { id: 'C1', stageId: 'S1', throw: 1, ...cylinder },
      { id: 'C2', stageId: 'S1', throw: 2, ...cylinder },
    ],
    valvePositions: cylinderIds('K-301', ['C1', 'C2']).map(({ machine: _m, ...position }) => position),
    bearings: [1, 2, 3].map((index) => ({
      id: `MB${index}`,
      kind: 'main' as const,
      index,
      journalDiameterM: 0.09,
      limits: {},
    })),
    lubeOilPoints: [{ id: 'LO', name: 'Lube oil header' }],
  };
}

/** The demo site configuration, version 1, checked by the schema (which also fills its defaults). */
export function demoConfig(publishedAt = '2026-01-01T00:00:00Z'): SiteConfig {
  const k101 = { id: 'K-101', name: 'K-101', pressureUnit: 'barg' as const, temperatureUnit: 'degC' as const };
  const k102 = { id: 'K-102', name: 'K-102', pressureUnit: 'psig' as const, temperatureUnit: 'degF' as const };
  const a = gasCompressorPoints(k101);
  const b = gasCompressorPoints(k102);
  const h = boosterPoints();
  return SiteConfig.parse({
    version: 1,
    name: DEMO_SITE_NAME,
    publishedAt,
    barometer: { kind: 'elevation', elevationM: DEMO_ELEVATION_M },
    units: { system: 'SI', overrides: {} },
    gasStreams: [
      {
        id: 'field-gas',
        name: 'Field gas (inlet separator)',
        composition: {
          methane: 0.862,
          ethane: 0.068,
          propane: 0.03,
          isobutane: 0.005,
          nbutane: 0.008,
          isopentane: 0.002,
          npentane: 0.002,
          nitrogen: 0.015,
          carbonDioxide: 0.008,
        },
        standardBasis: 'Sm3-15C',
      },
      {
        id: 'hydrogen',
        name: 'Hydrogen make-up',
        composition: { hydrogen: 0.995, methane: 0.003, nitrogen: 0.002 },
        standardBasis: 'Nm3-0C',
      },
    ],
    machines: [gasCompressor(k101), gasCompressor(k102), booster()],
    routes: [
      { id: 'morning', name: 'Morning round, all machines', points: [...a.morning, ...b.morning, ...h.morning] },
      { id: 'night', name: 'Night round, essentials', points: [...a.night, ...b.night, ...h.night] },
    ],
    cautionSets: [OPEN_MACHINE_CAUTIONS],
  });
}
