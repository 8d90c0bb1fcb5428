/**
 * Ninety days of invented rounds at the demo site, with a story a supervisor should find in them:
 * - a crank-end suction valve on K-101 cylinder C3 starts leaking about 40 days before the end: its cover warms
 *   against its peers and the cylinder's discharge runs ever hotter than predicted;
 * - the crosshead pin of K-102 throw 3 creeps up during the last 30 days;
 * - two valve changes and one bearing clearance check, each behind the lockout cautions.
 * Deterministic for a given seed and end time, so tests can rely on it. Invented data: it describes no real machine.
 */
import { bearingClearance, dischargeTemperature, fromSI, toSI } from '../calc';
import { barometerOf, evaluateRound } from '../checks';
import {
  type BearingClearanceRecord,
  type CheckPoint,
  envelopeFor,
  type FinishedRound,
  type LockoutAck,
  type Reading,
  type SiteConfig,
  type TypedEnvelope,
  type ValveChange,
} from '../schema';
import { noise, seededRandom, seededUuid } from './random';
import { DEMO_PEOPLE, demoConfig, OPEN_MACHINE_CAUTIONS } from './site';

export const DEMO_DAYS = 90;
/** The end of the invented history unless another is asked for. */
export const DEMO_END = '2026-11-30T00:00:00Z';
export const DEMO_SEED = 20_261_130;
export const DEMO_DEVICES = { operators: 'tablet-1', mechanic: 'tablet-2' } as const;

/** The developing suction valve leak: on K-101 C3, crank end, growing from day LEAK_START_DAY to the end. */
export const LEAK = {
  machineId: 'K-101',
  cylinderId: 'C3',
  coverId: 'C3-CE-S1',
  startDay: 50,
  coverRiseK: 19,
  dischargeRiseK: 14,
} as const;
/** The creeping crosshead pin: K-102 XH3, rising from CREEP_START_DAY. */
export const CREEP = { machineId: 'K-102', bearingId: 'XH3', startDay: 60, riseKPerDay: 0.35 } as const;

export interface DemoHistory {
  config: SiteConfig;
  rounds: FinishedRound[];
  valveChanges: ValveChange[];
  bearingClearances: BearingClearanceRecord[];
  lockoutAcks: LockoutAck[];
}

const DAY_MS = 86_400_000;
/** 1 ft·lbf = 0.3048 m × 4.448 221 615 260 5 N (exact; NIST SP 811, B.8). */
const NM_PER_FTLBF = 0.3048 * 4.4482216152605;
const C = (celsius: number) => toSI(celsius, 'degC');

interface MachineState {
  ps1: number;
  pd1: number;
  ps2: number;
  pd2: number;
  ts1: number;
  ts2: number;
  oilK: number;
}

/** How the text on a gauge of this unit is written (its resolution). */
function formatFor(unit: string | null, value: number): string {
  switch (unit) {
    case 'barg':
      return value.toFixed(1);
    case 'psig':
    case 'degC':
    case 'degF':
      return value.toFixed(0);
    default:
      return value.toFixed(1);
  }
}

export function demoHistory(options: { end?: string; days?: number; seed?: number } = {}): DemoHistory {
  const config = demoConfig();
  const days = options.days ?? DEMO_DAYS;
  const endMs = Date.parse(options.end ?? DEMO_END);
  const random = seededRandom(options.seed ?? DEMO_SEED);
  const baro = barometerOf(config);
  const gas = (id: string) =>
    config.gasStreams.find((stream) => stream.id === id)?.composition as Record<string, number>;
  const rounds: FinishedRound[] = [];
  const allReadings: Reading[] = [];

  for (let day = 0; day < days; day += 1) {
    for (const shift of ['morning', 'night'] as const) {
      const startMs = endMs - (days - day) * DAY_MS + (shift === 'morning' ? 6 : 22) * 3_600_000;
      const route = config.routes.find((r) => r.id === shift);
      if (!route) continue;
      const roundId = seededUuid(random);
      const person = shift === 'morning' ? DEMO_PEOPLE.operator : DEMO_PEOPLE.operator2;
      const ambient = shift === 'morning' ? 0 : -4;
      const states: Record<string, MachineState> = {};
      for (const machineId of ['K-101', 'K-102', 'K-301']) {
        const booster = machineId === 'K-301';
        states[machineId] = {
          ps1: toSI(booster ? 25 + noise(random, 0.3) : 3 + noise(random, 0.15), 'barg', { barometricPa: baro }),
          pd1: toSI(booster ? 60 + noise(random, 0.4) : 12.4 + noise(random, 0.15), 'barg', { barometricPa: baro }),
          ps2: toSI(12 + noise(random, 0.15), 'barg', { barometricPa: baro }),
          pd2: toSI(45 + noise(random, 0.4), 'barg', { barometricPa: baro }),
          ts1: C((booster ? 30 : 28) + ambient + noise(random, 1.5)),
          ts2: C(40 + ambient / 2 + noise(random, 0.8)),
          oilK: C((booster ? 50 : 55) + noise(random, 0.8)),
        };
      }
      const leakShare = Math.max(0, (day - LEAK.startDay) / (days - LEAK.startDay));
      const predictedTd = (machineId: string, stage: 1 | 2) => {
        const s = states[machineId] as MachineState;
        const composition = gas(machineId === 'K-301' ? 'hydrogen' : 'field-gas');
        return dischargeTemperature({
          suctionTemperatureK: stage === 1 ? s.ts1 : s.ts2,
          suctionPressurePa: stage === 1 ? s.ps1 : s.ps2,
          dischargePressurePa: stage === 1 ? s.pd1 : s.pd2,
          composition,
        }).temperatureK;
      };
      const cylinderTd: Record<string, number> = {};
      for (const machineId of ['K-101', 'K-102', 'K-301']) {
        for (const cylinder of ['C1', 'C2', 'C3', 'C4']) {
          if (machineId === 'K-301' && (cylinder === 'C3' || cylinder === 'C4')) continue;
          const stage = machineId === 'K-301' || cylinder === 'C1' || cylinder === 'C2' ? 1 : 2;
          let td = predictedTd(machineId, stage) + 2 + noise(random, 1);
          if (machineId === LEAK.machineId && cylinder === LEAK.cylinderId) td += LEAK.dischargeRiseK * leakShare;
          cylinderTd[`${machineId}/${cylinder}`] = td;
        }
      }

      const trueValue = (point: CheckPoint): number | string | null => {
        const s = states[point.machineId] as MachineState;
        const stageTwo = point.stageId === 'S2';
        switch (point.role) {
          case 'suctionPressure':
            return stageTwo ? s.ps2 : s.ps1;
          case 'dischargePressure':
            return stageTwo ? s.pd2 : s.pd1;
          case 'suctionTemperature':
            return stageTwo ? s.ts2 : s.ts1;
          case 'dischargeTemperature':
            return cylinderTd[`${point.machineId}/${point.cylinderId}`] ?? null;
          case 'oilSupplyTemperature':
            return s.oilK;
          case 'oilPressure':
            return toSI((point.machineId === 'K-301' ? 3 : 3.4) + noise(random, 0.08), 'barg', { barometricPa: baro });
          default:
            break;
        }
        switch (point.kind) {
          case 'valveCoverTemperature': {
            const position = config.machines
              .find((m) => m.id === point.machineId)
              ?.valvePositions.find((v) => v.id === point.valvePositionId);
            if (!position) return null;
            const suction = position.service === 'suction';
            const stageTwo2 = point.stageId === 'S2';
            let value = suction
              ? (stageTwo2 ? s.ts2 : s.ts1) + 8 + noise(random, 1.2)
              : (cylinderTd[`${point.machineId}/${position.cylinderId}`] ?? s.ts1) - 8 + noise(random, 1.2);
            if (point.machineId === LEAK.machineId && position.id === LEAK.coverId)
              value += LEAK.coverRiseK * leakShare;
            return value;
          }
          case 'bearingTemperature': {
            if (point.bearingId?.startsWith('XH')) {
              let value = C(62 + ambient / 4 + noise(random, 0.5));
              if (point.machineId === CREEP.machineId && point.bearingId === CREEP.bearingId && day > CREEP.startDay) {
                value += CREEP.riseKPerDay * (day - CREEP.startDay);
              }
              return value;
            }
            return s.oilK + 18 + noise(random, 0.6);
          }
          case 'level':
            return 65 + noise(random, 3);
          case 'vibration':
            return 5.5 + noise(random, 0.6);
          case 'yesNo':
            if (point.lockout) return null; // weekly, isolated-machine check: not on ordinary rounds
            if (point.expected?.answer === 'no') return 'no';
            // Now and then a packing vent looks wrong to someone; detectors and leaks stay quiet in the demo.
            return point.expected?.otherwise === 'watch' && random() < 0.02 ? 'no' : 'yes';
          case 'choice':
            return random() < 0.05 ? (point.choices?.[1] ?? null) : (point.choices?.[0] ?? null);
          case 'text':
            return 'No remarks.';
          default:
            return null;
        }
      };

      const readings: Reading[] = route.points.map((point, index) => {
        const at = new Date(startMs + index * 20_000).toISOString();
        const value = trueValue(point);
        const base = { id: seededUuid(random), roundId, pointId: point.id, at };
        if (value === null) {
          return {
            ...base,
            entered: null,
            valueSI: null,
            skipped: { reason: 'Weekly check with the machine isolated; not due on this round.' },
          };
        }
        if (typeof value === 'string') return { ...base, entered: { text: value, unit: null }, valueSI: null };
        const unit = point.unit ?? null;
        const shown = unit ? fromSI(value, unit, { barometricPa: baro }) : value;
        const text = formatFor(unit, shown);
        const valueSI = unit ? toSI(Number(text), unit, { barometricPa: baro }) : Number(text);
        return { ...base, entered: { text, unit }, valueSI };
      });
      const finishedAt = new Date(startMs + route.points.length * 20_000 + 60_000).toISOString();
      const recent = allReadings.slice(-4000);
      const findings = evaluateRound(config, readings, { readings: recent });
      rounds.push({
        round: {
          id: roundId,
          siteName: config.name,
          routeId: route.id,
          configVersion: config.version,
          by: person,
          deviceId: DEMO_DEVICES.operators,
          startedAt: new Date(startMs).toISOString(),
          finishedAt,
          state: 'finished',
        },
        readings,
        findings,
      });
      allReadings.push(...readings);
    }
  }

  const maintenance = demoMaintenance(config, endMs, days, random);
  return { config, rounds, ...maintenance };
}

function demoMaintenance(config: SiteConfig, endMs: number, days: number, random: () => number) {
  const at = (day: number, hour: number, minute = 0) =>
    new Date(endMs - (days - day) * DAY_MS + hour * 3_600_000 + minute * 60_000).toISOString();
  const ack = (task: LockoutAck['task'], day: number): LockoutAck => ({
    id: seededUuid(random),
    task,
    cautionSetId: OPEN_MACHINE_CAUTIONS.id,
    configVersion: config.version,
    by: DEMO_PEOPLE.mechanic,
    acknowledgements: OPEN_MACHINE_CAUTIONS.cautions.map((caution, index) => ({
      cautionId: caution.id,
      at: at(day, 9, index),
    })),
    completedAt: at(day, 9, OPEN_MACHINE_CAUTIONS.cautions.length),
  });
  const runHours = (machineHoursAtStart: number, day: number) => machineHoursAtStart + day * 23.6;

  const ack1 = ack({ kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-D2' }, 20);
  const ack2 = ack({ kind: 'valveChange', machineId: 'K-102', ref: 'C2-CE-S1' }, 45);
  const ack3 = ack({ kind: 'bearingClearance', machineId: 'K-102', ref: 'MB3' }, 46);
  const valveChanges: ValveChange[] = [
    {
      id: seededUuid(random),
      machineId: 'K-101',
      valvePositionId: 'C1-HE-D2',
      at: at(20, 11),
      by: DEMO_PEOPLE.mechanic,
      reason: 'failure',
      removedValveId: 'DV-0417',
      installedValveId: 'DV-0562',
      asFound: ['broken plate', 'debris'],
      partsFitted: ['complete valve', 'gaskets'],
      capBoltTorque: { text: '340', unit: 'Nm', valueNm: 340 },
      runHours: Math.round(runHours(41_200, 20)),
      notes: 'Plate broken in two; fine scale in the pocket. Strainer upstream checked.',
      lockoutAckId: ack1.id,
    },
    {
      id: seededUuid(random),
      machineId: 'K-102',
      valvePositionId: 'C2-CE-S1',
      at: at(45, 12),
      by: DEMO_PEOPLE.mechanic,
      reason: 'planned',
      removedValveId: 'SV-0311',
      installedValveId: 'SV-0598',
      asFound: ['worn seat', 'tired springs'],
      partsFitted: ['plates', 'springs', 'gaskets'],
      capBoltTorque: { text: '250', unit: 'ftlbf', valueNm: 250 * NM_PER_FTLBF },
      runHours: Math.round(runHours(38_900, 45)),
      lockoutAckId: ack2.id,
    },
  ];
  const bearing = config.machines.find((m) => m.id === 'K-102')?.bearings.find((b) => b.id === 'MB3');
  const measuredM = 0.17e-3;
  const result = bearingClearance({
    measuredM,
    journalDiameterM: bearing?.journalDiameterM ?? 0.18,
    ...(bearing?.clearance ? { specMinM: bearing.clearance.specMinM, specMaxM: bearing.clearance.specMaxM } : {}),
    ...(bearing?.clearance?.wearLimitM === undefined ? {} : { wearLimitM: bearing.clearance.wearLimitM }),
  });
  const bearingClearances: BearingClearanceRecord[] = [
    {
      id: seededUuid(random),
      machineId: 'K-102',
      bearingId: 'MB3',
      at: at(46, 13),
      by: DEMO_PEOPLE.mechanic,
      method: 'plastigage',
      measurements: [{ where: 'top', entered: { text: '0.17', unit: 'mm' }, valueM: measuredM }],
      spec: {
        ...(bearing?.clearance ? { minM: bearing.clearance.specMinM, maxM: bearing.clearance.specMaxM } : {}),
        ...(bearing?.clearance?.wearLimitM === undefined ? {} : { wearLimitM: bearing.clearance.wearLimitM }),
      },
      result: { status: result.status, perDiameter: result.perDiameter, message: result.message },
      notes: 'Cap torqued to the maker’s figure before the strip was read; shell shows light scoring only.',
      lockoutAckId: ack3.id,
    },
  ];
  // The discharge valve at K-101 C1-HE-D2 keeps breaking: two more changes around the one above. (Made after the
  // records above so that their seeded ids stay the same.)
  const ack4 = ack({ kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-D2' }, 8);
  const ack5 = ack({ kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-D2' }, 70);
  valveChanges.push(
    {
      id: seededUuid(random),
      machineId: 'K-101',
      valvePositionId: 'C1-HE-D2',
      at: at(8, 11),
      by: DEMO_PEOPLE.mechanic,
      reason: 'failure',
      removedValveId: 'DV-0388',
      installedValveId: 'DV-0417',
      asFound: ['broken plate'],
      partsFitted: ['complete valve', 'gaskets'],
      capBoltTorque: { text: '340', unit: 'Nm', valueNm: 340 },
      runHours: Math.round(runHours(41_200, 8)),
      lockoutAckId: ack4.id,
    },
    {
      id: seededUuid(random),
      machineId: 'K-101',
      valvePositionId: 'C1-HE-D2',
      at: at(70, 10),
      by: DEMO_PEOPLE.mechanic,
      reason: 'failure',
      removedValveId: 'DV-0562',
      installedValveId: 'DV-0601',
      asFound: ['broken springs', 'flutter marks'],
      partsFitted: ['springs', 'plates', 'gaskets'],
      capBoltTorque: { text: '340', unit: 'Nm', valueNm: 340 },
      runHours: Math.round(runHours(41_200, 70)),
      notes: 'Light flutter marks: the valve may be over-sprung for this duty; raised with engineering.',
      lockoutAckId: ack5.id,
    },
  );
  valveChanges.sort((a, b) => Date.parse(a.at) - Date.parse(b.at));
  const lockoutAcks = [ack1, ack2, ack3, ack4, ack5].sort(
    (a, b) => Date.parse(a.completedAt) - Date.parse(b.completedAt),
  );
  return { valveChanges, bearingClearances, lockoutAcks };
}

/** The demo history as sync envelopes, as the server seed and a tablet import take it. */
export function demoEnvelopes(history: DemoHistory): TypedEnvelope[] {
  const envelopes: TypedEnvelope[] = [];
  for (const round of history.rounds) {
    envelopes.push(
      envelopeFor('round', round, {
        author: round.round.by.id,
        device: DEMO_DEVICES.operators,
        createdAt: round.round.finishedAt as string,
      }),
    );
  }
  const mechanic = { author: DEMO_PEOPLE.mechanic.id, device: DEMO_DEVICES.mechanic };
  for (const body of history.lockoutAcks)
    envelopes.push(envelopeFor('lockoutAck', body, { ...mechanic, createdAt: body.completedAt }));
  for (const body of history.valveChanges)
    envelopes.push(envelopeFor('valveChange', body, { ...mechanic, createdAt: body.at }));
  for (const body of history.bearingClearances)
    envelopes.push(envelopeFor('bearingClearance', body, { ...mechanic, createdAt: body.at }));
  return envelopes.sort((a, b) => Date.parse(a.createdAt) - Date.parse(b.createdAt));
}
