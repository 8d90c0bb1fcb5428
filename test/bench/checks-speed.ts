/**
 * Speed of the checks engine on a 200-point round with history, as the tablet runs it after each reading.
 * Target: under 5 ms per evaluation on the 2-core reference machine. The round is the demo's morning round with a
 * copy of one gas compressor added (as K-103) to reach 200 points; history is the 20 rounds before it.
 */
import { performance } from 'node:perf_hooks';
import { evaluateRound } from '../../src/checks';
import { demoHistory } from '../../src/demo';
import { type Reading, SiteConfig } from '../../src/schema';
import type { BenchRow } from './rows';

const CALLS = 300;

export async function checksSpeed(): Promise<BenchRow[]> {
  const history = demoHistory({ days: 12 });
  const base = history.config;
  const source = base.machines.find((m) => m.id === 'K-101');
  if (!source) throw new Error('demo has no K-101');
  const copyPoint = <T extends { id: string; machineId: string }>(point: T): T => ({
    ...point,
    id: point.id.replace('K-101', 'K-103'),
    machineId: 'K-103',
  });
  const morning = base.routes.find((r) => r.id === 'morning');
  if (!morning) throw new Error('demo has no morning route');
  const extraPoints = morning.points.filter((p) => p.machineId === 'K-101').map(copyPoint);
  const config = SiteConfig.parse({
    ...base,
    machines: [...base.machines, { ...source, id: 'K-103', name: 'K-103' }],
    routes: [
      { ...morning, points: [...morning.points, ...extraPoints] },
      ...base.routes.filter((r) => r.id !== 'morning'),
    ],
  });
  const rounds = history.rounds;
  const last = rounds.filter((r) => r.round.routeId === 'morning').at(-1);
  if (!last) throw new Error('no morning round');
  const copyReading = (r: Reading): Reading => ({ ...r, pointId: r.pointId.replace('K-101', 'K-103') });
  const readings = [
    ...last.readings,
    ...last.readings.filter((r) => r.pointId.startsWith('K-101')).map(copyReading),
  ].slice(0, 200);
  const earlier = rounds
    .slice(-21, -1)
    .flatMap((r) => [...r.readings, ...r.readings.filter((x) => x.pointId.startsWith('K-101')).map(copyReading)]);
  const past = { readings: earlier };

  for (let index = 0; index < 20; index += 1) evaluateRound(config, readings, past);
  const start = performance.now();
  let findings = 0;
  for (let index = 0; index < CALLS; index += 1) findings = evaluateRound(config, readings, past).length;
  const perCall = (performance.now() - start) / CALLS;

  // A first evaluation with a history the engine has not seen yet (its time index is built then).
  const coldStart = performance.now();
  evaluateRound(config, readings, { readings: [...earlier] });
  const cold = performance.now() - coldStart;
  return [
    {
      figure: `evaluateRound, ${readings.length} points with history`,
      value: Math.round(perCall * 100) / 100,
      unit: 'ms/call',
      note: `target < 5 ms; ${findings} findings; ${earlier.length} history readings; ${CALLS} calls`,
    },
    {
      figure: 'evaluateRound, first call with new history',
      value: Math.round(cold * 100) / 100,
      unit: 'ms',
      note: 'includes grouping and time-indexing the history',
    },
  ];
}
