/**
 * Speed of the thermodynamic calculations a screen runs on every entered reading: a full stagePerformance with the
 * gas composition (k iterated at the mean temperature) and a 100-point powerCurve. Target: stagePerformance under
 * 50 µs per call on the 2-core reference machine.
 */
import { performance } from 'node:perf_hooks';
import { powerCurve, type StageInput, stagePerformance } from '../../src/calc';
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
  return [
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
