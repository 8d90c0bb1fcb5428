/**
 * Speed of the calculations a screen runs on every entered reading: a full stagePerformance with the gas composition
 * (k iterated at the mean temperature), a 100-point powerCurve, rodLoad at 0.1° and every check of a 4-throw machine.
 * Targets on the 2-core reference machine: stagePerformance under 50 µs, rodLoad under 2 ms per call.
 */
import { performance } from 'node:perf_hooks';
import {
  assessBearingTemperature,
  assessDischargeTemperature,
  assessValveCovers,
  powerCurve,
  type RodLoadInput,
  rodLoad,
  type StageInput,
  stagePerformance,
} from '../../src/calc';
import type { BenchRow } from './rows';

const PIPELINE_GAS = {
  methane: 0.9,
  ethane: 0.05,
  propane: 0.02,
  isobutane: 0.005,
  nbutane: 0.005,
  nitrogen: 0.01,
  carbonDioxide: 0.01,
};

const STAGE: StageInput = {
  boreM: 0.25,
  rodM: 0.06,
  strokeM: 0.14,
  speedRpm: 900,
  headClearance: 0.16,
  crankClearance: 0.19,
  headActive: true,
  crankActive: true,
  suctionPressurePa: 20e5,
  dischargePressurePa: 50e5,
  suctionTemperatureK: 303.15,
  composition: PIPELINE_GAS,
  zSuction: 0.955,
  zDischarge: 0.935,
  veMethod: 'empirical',
};

const CALLS = 10_000;
const ROD_LOAD_CALLS = 500;
const MACHINE_CALLS = 200;

const THROW: RodLoadInput = {
  boreM: 0.25,
  rodM: 0.06,
  strokeM: 0.14,
  connectingRodM: 0.35,
  speedRpm: 900,
  suctionPressurePa: 20e5,
  dischargePressurePa: 50e5,
  distancePiecePressurePa: 101_325,
  headClearance: 0.16,
  crankClearance: 0.19,
  headActive: true,
  crankActive: true,
  exponent: 1.28,
  reciprocatingMassKg: 110,
  ratedCompressionN: 200_000,
  ratedTensionN: 180_000,
};

const K = (celsius: number) => celsius + 273.15;
const COVERS = ['HE-S1', 'HE-S2', 'CE-S3', 'CE-S4', 'HE-D1', 'HE-D2', 'CE-D3', 'CE-D4'].map((id, index) => ({
  id,
  end: id.startsWith('HE') ? ('head' as const) : ('crank' as const),
  service: id.includes('-S') ? ('suction' as const) : ('discharge' as const),
  temperatureK: K(id.includes('-S') ? 40 + index : 110 + index),
}));

/** Every round check of a 4-throw machine: stage, discharge judgement, rod load, covers per throw; 9 bearings. */
function checkMachine(index: number): void {
  for (let throwIndex = 0; throwIndex < 4; throwIndex += 1) {
    const stage = stagePerformance({ ...STAGE, dischargePressurePa: 50e5 + throwIndex * 1e4 + index });
    assessDischargeTemperature({
      suctionTemperatureK: STAGE.suctionTemperatureK,
      predictedK: stage.predictedDischargeTemperatureK,
      observedK: stage.predictedDischargeTemperatureK + 5,
      pressureRatio: stage.pressureRatio,
    });
    rodLoad({ ...THROW, dischargePressurePa: 50e5 + throwIndex * 1e4 + index });
    assessValveCovers({ covers: COVERS, suctionGasK: K(32), dischargeGasK: K(118) });
  }
  for (let bearing = 0; bearing < 9; bearing += 1) {
    assessBearingTemperature({
      temperatureK: K(70 + bearing),
      oilSupplyK: K(55),
      previous: { temperatureK: K(69 + bearing), at: '2026-03-01T00:00:00Z' },
      at: '2026-03-01T08:00:00Z',
      peersK: [K(70), K(71), K(72)],
      limits: {},
    });
  }
}

function timePerCall(run: (index: number) => unknown, calls: number): number {
  for (let index = 0; index < Math.min(200, calls); index += 1) run(index); // warm-up
  const start = performance.now();
  for (let index = 0; index < calls; index += 1) run(index);
  return ((performance.now() - start) * 1000) / calls;
}

export async function calcSpeed(): Promise<BenchRow[]> {
  // Vary the discharge pressure so no call repeats the last one exactly.
  const stageMicros = timePerCall(
    (index) => stagePerformance({ ...STAGE, dischargePressurePa: 40e5 + (index % 100) * 1e4 }),
    CALLS,
  );
  const curveMicros = timePerCall(
    (index) => powerCurve({ ...STAGE, suctionPressurePa: 20e5 + (index % 100) * 100 }),
    CALLS,
  );
  const curveWithKMicros = timePerCall((index) => {
    const { composition: _gas, ...rest } = STAGE;
    return powerCurve({ ...rest, k: 1.28, suctionPressurePa: 20e5 + (index % 100) * 100 });
  }, CALLS);
  const rodLoadMicros = timePerCall((index) => rodLoad({ ...THROW, speedRpm: 800 + (index % 100) }), ROD_LOAD_CALLS);
  const machineMicros = timePerCall(checkMachine, MACHINE_CALLS);
  return [
    {
      figure: 'rodLoad, 0.1° resolution, one throw',
      value: Math.round(rodLoadMicros) / 1000,
      unit: 'ms/call',
      note: `target < 2 ms; ${ROD_LOAD_CALLS} calls`,
    },
    {
      figure: 'all checks of a 4-throw machine',
      value: Math.round(machineMicros) / 1000,
      unit: 'ms/call',
      note: `4 × (stage, discharge, rod load, 8 covers) + 9 bearings; ${MACHINE_CALLS} calls`,
    },
    {
      figure: 'stagePerformance, composition',
      value: Math.round(stageMicros * 100) / 100,
      unit: 'µs/call',
      note: `target < 50 µs; ${CALLS} calls`,
    },
    {
      figure: 'powerCurve 100 points, composition',
      value: Math.round(curveMicros),
      unit: 'µs/call',
      note: `${CALLS} calls; k iterated at every point`,
    },
    {
      figure: 'powerCurve 100 points, fixed k',
      value: Math.round(curveWithKMicros),
      unit: 'µs/call',
      note: `${CALLS} calls`,
    },
  ];
}
