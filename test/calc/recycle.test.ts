import { describe, expect, it } from 'vitest';
import { firstStageRecycle, type RecycleInput, recycleFraction } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose, K_TO_C } from './helpers';

describe('recycleFraction', () => {
  // Engineering reference §11 (mass balance): Q_cyl 12 000 Sm³/h, target 9000 → recycle 3000, f = 0.25
  it('should give 3000 Sm³/h and f = 0.25', () => {
    expect(recycleFraction(12_000, 9000)).toEqual({ recycleFlow: 3000, fraction: 0.25 });
  });

  it('should refuse a target above what the stage swallows, or none', () => {
    expectCalcError(() => recycleFraction(12_000, 12_001), 'E_RECYCLE_RANGE', 'targetFlow');
    expectCalcError(() => recycleFraction(12_000, 0), 'E_RECYCLE_RANGE', 'targetFlow');
  });
});

/** Example RC1 of the engineering reference: two stages, intercooled to 35 °C, k = 1.28, C = 0.15, ideal gas. */
const stage = { clearanceFraction: 0.15, suctionTemperatureK: C_TO_K(35), k: 1.28 };
const RC1: Omit<RecycleInput, 'targetMolarFlowMolS' | 'mode'> = {
  stages: [
    { ...stage, displacementM3s: 1500 / 3600 },
    { ...stage, displacementM3s: 560 / 3600 },
  ],
  firstStageSuctionPressurePa: 3e5,
  finalDischargePressurePa: 27e5,
  veMethod: 'theoretical',
};
const KMOL_PER_H = 1 / 3.6; // mol/s per kmol/h

describe('firstStageRecycle (example RC1, computed there from the same balance)', () => {
  const seventyPercent = 0.7 * 143.0 * KMOL_PER_H;

  it('base case: 8.418 bara interstage, ratios 2.806 / 3.207, 143.0 kmol/h, 117.8 + 135.1 kW', () => {
    const { base } = firstStageRecycle({ ...RC1, mode: 'full', targetMolarFlowMolS: seventyPercent });
    const [first, second] = base.stages;
    expectClose((first?.dischargePressurePa ?? 0) / 1e5, 8.418);
    expectClose(first?.pressureRatio ?? 0, 2.806);
    expectClose(second?.pressureRatio ?? 0, 3.207);
    expectClose(base.netMolarFlowMolS / KMOL_PER_H, 143.0);
    expectClose((first?.isentropicPowerW ?? 0) / 1000, 117.8);
    expectClose((second?.isentropicPowerW ?? 0) / 1000, 135.1);
    expectClose(base.totalIsentropicPowerW / 1000, 252.9);
    expectClose(base.specificEnergyJPerMol / 3.6e3, 1.769); // kWh/kmol
    expectClose(K_TO_C(second?.dischargeTemperatureK ?? 0), 124.5);
  });

  it('70 % by first-stage recycle: interstage falls to 6.567 bara and the last stage gets hotter', () => {
    const result = firstStageRecycle({ ...RC1, mode: 'first-stage', targetMolarFlowMolS: seventyPercent });
    const [first, second] = result.recycled.stages;
    expectClose((first?.dischargePressurePa ?? 0) / 1e5, 6.567);
    expectClose(first?.pressureRatio ?? 0, 2.189);
    expectClose(second?.pressureRatio ?? 0, 4.111);
    expectClose((first?.molarFlowMolS ?? 0) / KMOL_PER_H, 153.4);
    expectClose(result.recycled.netMolarFlowMolS / KMOL_PER_H, 100.1);
    expectClose(result.recycleFraction, 0.3475);
    expectClose((first?.isentropicPowerW ?? 0) / 1000, 93.3);
    expectClose((second?.isentropicPowerW ?? 0) / 1000, 118.0);
    expectClose(result.recycled.totalIsentropicPowerW / 1000, 211.3);
    expectClose(result.recycled.specificEnergyJPerMol / 3.6e3, 2.111);
    expectClose(K_TO_C(second?.dischargeTemperatureK ?? 0), 146.7);
    expectClose(K_TO_C(first?.dischargeTemperatureK ?? 0), 92.61);
  });

  it('70 % by full recycle: every stage keeps its flow and power; energy per net mole rises as 1/(1 − f)', () => {
    const result = firstStageRecycle({ ...RC1, mode: 'full', targetMolarFlowMolS: seventyPercent });
    expectClose(result.recycleFraction, 0.3);
    expectClose(result.recycled.totalIsentropicPowerW, result.base.totalIsentropicPowerW, 1e-12);
    expectClose(result.recycled.specificEnergyJPerMol / 3.6e3, 2.526);
  });

  it('should refuse a target above what the machine makes, and inverted pressures', () => {
    expectCalcError(
      () => firstStageRecycle({ ...RC1, mode: 'first-stage', targetMolarFlowMolS: 150 * KMOL_PER_H }),
      'E_RECYCLE_RANGE',
      'targetMolarFlowMolS',
    );
    expectCalcError(
      () => firstStageRecycle({ ...RC1, mode: 'full', targetMolarFlowMolS: 1, finalDischargePressurePa: 2e5 }),
      'E_RATIO_LT_1',
      'finalDischargePressurePa',
    );
    expectCalcError(
      () => firstStageRecycle({ ...RC1, stages: [], mode: 'full', targetMolarFlowMolS: 1 }),
      'E_RECYCLE_RANGE',
      'stages',
    );
  });
});
