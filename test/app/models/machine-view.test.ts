import { describe, expect, it } from 'vitest';
import {
  cylinderStageInput,
  loadArcs,
  MachineViewError,
  machineView,
  pvLoops,
  stagePowerCurve,
} from '../../../src/app/models/machine-view';
import { isentropicPower, pistonDisplacement, stagePerformance, toSI, volumetricEfficiency } from '../../../src/calc';
import { evaluateRound } from '../../../src/checks';
import type { FinishedRound, Reading } from '../../../src/schema';
import { config, reading } from '../../checks/fixture';

const round = (id: string, startedAt: string, readings: Array<[string, string, string]>): FinishedRound => {
  const roundId = `00000000-0000-4000-9000-${id.padStart(12, '0')}`;
  const rs: Reading[] = readings.map(([point, text, unit]) => reading(point, text, unit, startedAt, roundId));
  return {
    round: {
      id: roundId,
      siteName: config.name,
      routeId: 'r',
      configVersion: config.version,
      by: { id: 'tester', name: 'Tester' },
      deviceId: 'dev',
      startedAt,
      finishedAt: startedAt,
      state: 'finished',
    },
    readings: rs,
    findings: evaluateRound(config, rs),
  };
};

const rel = (actual: number, expected: number) => Math.abs(actual - expected) / Math.abs(expected);

describe('machineView', () => {
  const d4 = round('1', '2026-03-01T08:00:00Z', [
    ['PS', '30', 'bara'],
    ['PD', '75', 'bara'],
    ['TS', '30', 'degC'],
    ['TD', '104', 'degC'],
  ]);
  const r1 = round('2', '2026-03-02T08:00:00Z', [
    ['PS', '20', 'bara'],
    ['PD', '50', 'bara'],
    ['TS', '30', 'degC'],
    ['TD', '118', 'degC'],
  ]);

  it('refuses an unknown machine', () => {
    expect(() => machineView(config, 'nope', [d4])).toThrow(MachineViewError);
  });

  it('D4: observed 104 °C against 94.09 °C predicted for pipeline gas 30 → 75 bara at 30 °C', () => {
    // source: engineering reference §3.4 D2/D4 (computed there from the cited isentropic formula and NASA-7 Cp)
    const view = machineView(config, 'M1', [r1, d4]);
    const stage = view.stages[0];
    const observed = stage?.dischargeTemperature.lines.find((l) => l.kind === 'observed');
    const predicted = stage?.dischargeTemperature.lines.find((l) => l.kind === 'predicted');
    expect(observed?.times).toEqual([
      Date.parse('2026-03-01T08:00:00Z') / 1000,
      Date.parse('2026-03-02T08:00:00Z') / 1000,
    ]);
    expect(observed?.values[0]).toBeCloseTo(toSI(104, 'degC'), 6);
    expect((predicted?.values[0] as number) - 273.15).toBeCloseTo(94.09, 1);
    expect(observed?.values[1]).toBeCloseTo(toSI(118, 'degC'), 6);
  });

  it('VE, capacity and power series equal calc stagePerformance at each round (predicted only, said so)', () => {
    const view = machineView(config, 'M1', [d4, r1]);
    const stage = view.stages[0];
    if (!stage) throw new Error('no stage');
    const cylinder = config.machines[0]?.cylinders[0];
    const machine = config.machines[0];
    if (!cylinder || !machine) throw new Error('fixture');
    const direct = stagePerformance(
      cylinderStageInput(
        machine,
        machine.stages[0] as never,
        cylinder,
        { suctionPressurePa: 20e5, dischargePressurePa: 50e5, suctionTemperatureK: 303.15 },
        config.gasStreams[0]?.composition as Record<string, number>,
        'Sm3-15C',
      ),
    );
    const he = stage.volumetricEfficiency.lines.find((l) => l.label === 'C1 head end predicted');
    expect(he?.values[1]).toBeCloseTo(direct.head.volumetricEfficiency, 10);
    expect(stage.capacity.lines[0]?.values[1]).toBeCloseTo(direct.standardFlowM3s, 10);
    expect(stage.power.lines[0]?.values[1]).toBeCloseTo(direct.shaftPowerW, 6);
    expect(stage.power.lines.every((l) => l.kind === 'predicted')).toBe(true);
    expect(stage.power.observedNote).toMatch(/no flow or power meter/);
  });

  it('R1: latest state 20 → 50 bara gives 145.3 kN compression at 286.2°, 111.8 kN tension at 96.72°, sign changes at 24.45° and 213.3°', () => {
    // source: engineering reference §8.4 worked example R1 (computed there from the cited slider-crank formulas)
    const view = machineView(config, 'M1', [d4, r1]);
    const t = view.throws[0];
    if (!t) throw new Error('no throw');
    expect(rel(t.peakCompression.loadN, 145.3e3)).toBeLessThan(1e-3);
    expect(t.peakCompression.atDeg).toBeCloseTo(286.2, 1);
    expect(rel(t.peakTension.loadN, 111.8e3)).toBeLessThan(1e-3);
    expect(t.signChangesDeg).toHaveLength(2);
    expect(t.signChangesDeg[0]).toBeCloseTo(24.45, 1);
    expect(t.signChangesDeg[1]).toBeCloseTo(213.3, 1);
    // Minority = tension, 188.8° of the revolution (§8.4)
    const reversed = t.arcs.filter((a) => a.reversed);
    expect(reversed.every((a) => a.direction === 'tension')).toBe(true);
    const span = reversed.reduce((sum, a) => sum + a.toDeg - a.fromDeg, 0);
    expect(span).toBeCloseTo(188.8, 0);
    expect(t.arcs.reduce((sum, a) => sum + a.toDeg - a.fromDeg, 0)).toBeCloseTo(360, 9);
    expect(t.ratedCompressionN).toBe(200_000);
    // same as the finding the checks stored for that round
    const stored = r1.findings.find((f) => f.rule === 'rodLoad');
    expect(t.peakCompression.loadN).toBeCloseTo(stored?.numbers.combinedCompressionN as number, 6);
  });

  it('loadArcs splits the arc that wraps through 0° and marks the minority direction', () => {
    // common practice: a load cos θ is compression from 270° through 0° to 90°
    const deg = Array.from({ length: 360 }, (_, k) => k);
    const load = deg.map((d) => Math.cos((d * Math.PI) / 180) + 0.5);
    const { arcs, signChangesDeg } = loadArcs(deg, load, 'tension');
    expect(signChangesDeg[0]).toBeCloseTo(120, 1);
    expect(signChangesDeg[1]).toBeCloseTo(240, 1);
    expect(arcs.map((a) => [a.direction, a.reversed])).toEqual([
      ['compression', false],
      ['tension', true],
      ['compression', false],
    ]);
    expect(arcs[0]?.fromDeg).toBe(0);
    expect(arcs[2]?.toDeg).toBe(360);
  });

  it('PV loop: valve events of R1 and loop work equal to the ideal-cycle work with clearance', () => {
    // source: engineering reference §8.4 R1 valve events: HE suction opens 44.40°, HE discharge 286.2°,
    // CE discharge 96.72°, CE suction 238.0°.
    const view = machineView(config, 'M1', [r1]);
    const he = view.pvLoops.find((l) => l.end === 'head');
    const ce = view.pvLoops.find((l) => l.end === 'crank');
    if (!he || !ce) throw new Error('no loops');
    expect(he.suctionOpensDeg).toBeCloseTo(44.4, 1);
    expect(he.dischargeOpensDeg).toBeCloseTo(286.2, 1);
    expect(ce.dischargeOpensDeg).toBeCloseTo(96.72, 1);
    expect(ce.suctionOpensDeg).toBeCloseTo(238.0, 1);
    expect(Math.min(...he.volumeM3)).toBeCloseTo(he.clearanceVolumeM3, 12);
    expect(Math.max(...he.volumeM3)).toBeCloseTo(he.clearanceVolumeM3 + he.sweptVolumeM3, 12);
    expect(Math.max(...he.pressurePa)).toBeCloseTo(50e5, 3);
    expect(Math.min(...he.pressurePa)).toBeCloseTo(20e5, 3);
    // source: ideal compressor with clearance, W = n/(n−1)·Ps·(V1 − V4)·(r^((n−1)/n) − 1), V1 − V4 = VE_th·Vswept
    // (Eastop & McConkey, Applied Thermodynamics, ch. 9; from memory)
    for (const [loop, c] of [
      [he, 0.16],
      [ce, 0.19],
    ] as const) {
      const n = 1.28;
      const ve = 1 - c * (2.5 ** (1 / n) - 1);
      const work = (n / (n - 1)) * 20e5 * ve * loop.sweptVolumeM3 * (2.5 ** ((n - 1) / n) - 1);
      expect(rel(loop.workPerCycleJ, work)).toBeLessThan(1e-3);
    }
  });

  it('P2: both ends at C = 0.16, 20 → 50 bara, k = 1.28: loops give 338.3 kW, the stage curve peaks at 461.5 kW at 100.1 bara', () => {
    // source: engineering reference §7.2 curve P2 (VE_th, ideal gas, PD 720.8 m³/h)
    const input = {
      boreM: 0.25,
      rodM: 0.06,
      strokeM: 0.14,
      connectingRodM: 0.35,
      speedRpm: 900,
      suctionPressurePa: 20e5,
      dischargePressurePa: 50e5,
      distancePiecePressurePa: 101_325,
      headClearance: 0.16,
      crankClearance: 0.16,
      headActive: true,
      crankActive: true,
      exponent: 1.28,
      reciprocatingMassKg: 110,
    };
    const loops = pvLoops('C1', input, '2026-03-01T00:00:00Z');
    const indicated = loops.reduce((sum, l) => sum + l.indicatedPowerW, 0);
    expect(rel(indicated, 338.3e3)).toBeLessThan(1e-3);
    const stageInput = {
      boreM: 0.25,
      rodM: 0.06,
      strokeM: 0.14,
      speedRpm: 900,
      headClearance: 0.16,
      crankClearance: 0.16,
      headActive: true,
      crankActive: true,
      suctionPressurePa: 20e5,
      dischargePressurePa: 50e5,
      suctionTemperatureK: 303.15,
      k: 1.28,
      veMethod: 'theoretical' as const,
    };
    const curve = stagePowerCurve([stageInput], 50e5);
    expect(rel(curve.peak.powerW, 461.5e3)).toBeLessThan(1e-3);
    expect(curve.peak.dischargePressurePa / 1e5).toBeCloseTo(100.1, 0);
    expect(rel(curve.operating.powerW, 338.3e3)).toBeLessThan(1e-3);
    expect(rel(curve.noDeliveryPressurePa, 252.6e5)).toBeLessThan(1e-3);
    // two identical cylinders: twice the power, same peak pressure
    const two = stagePowerCurve([stageInput, stageInput], 50e5);
    expect(rel(two.peak.powerW, 2 * curve.peak.powerW)).toBeLessThan(1e-9);
    expect(rel(two.peak.dischargePressurePa, curve.peak.dischargePressurePa)).toBeLessThan(1e-4);
    // consistent with calc's own isentropic power at the operating point
    const pd = pistonDisplacement({ boreM: 0.25, rodM: 0.06, strokeM: 0.14, speedRpm: 900, ends: 'both' });
    const ve = volumetricEfficiency({ clearanceFraction: 0.16, pressureRatio: 2.5, k: 1.28, method: 'theoretical' });
    expect(
      rel(
        curve.operating.powerW,
        isentropicPower({ suctionPressurePa: 20e5, inletFlowM3s: pd.totalM3s * ve, pressureRatio: 2.5, k: 1.28 }),
      ),
    ).toBeLessThan(1e-9);
  });

  it('machine view of the fixture marks the operating point on the curve at the latest discharge pressure', () => {
    const view = machineView(config, 'M1', [r1, d4]);
    const curve = view.stages[0]?.powerCurve;
    expect(view.stages[0]?.latest?.dischargePressurePa).toBeCloseTo(50e5, 3);
    expect(curve?.operating.dischargePressurePa).toBeCloseTo(50e5, 3);
    const stored = r1.findings.find((f) => f.rule === 'stagePerformance');
    expect(rel(curve?.operating.powerW as number, stored?.numbers.isentropicPowerW as number)).toBeLessThan(1e-9);
    expect(curve?.peak.powerW).toBeGreaterThanOrEqual(Math.max(...(curve?.points.map((p) => p.powerW) ?? [])));
  });

  it('without rounds there is no operating state, and the view says why', () => {
    const view = machineView(config, 'M1', []);
    expect(view.roundCount).toBe(0);
    expect(view.throws).toEqual([]);
    expect(view.stages[0]?.powerCurveNote).toMatch(/No round/);
  });
});
