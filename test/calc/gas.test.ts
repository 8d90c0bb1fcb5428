import { describe, expect, it } from 'vitest';
import { AIR, COMPONENTS, gasProperties } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose } from './helpers';

/** Typical pipeline natural gas of the engineering reference §2.4 (an illustrative composition). */
const PIPELINE_GAS = {
  methane: 0.9,
  ethane: 0.05,
  propane: 0.02,
  isobutane: 0.005,
  nbutane: 0.005,
  nitrogen: 0.01,
  carbonDioxide: 0.01,
};

describe('gasProperties against measured data', () => {
  // source: NIST Chemistry WebBook, gas-phase Cp at 298.15 K (J/(mol·K)): CH4 35.69, C2H6 52.49, C3H8 73.60
  it.each([
    ['methane', 35.69],
    ['ethane', 52.49],
    ['propane', 73.6],
  ])('should give Cp of %s within 0.05 %% of NIST at 298.15 K', (component, cp) => {
    expectClose(gasProperties({ [component]: 1 }, 298.15).cpJPerMolK, cp, 5e-4);
  });

  // source: Perry's Chemical Engineers' Handbook, table of Cp/Cv of gases at 1 atm (measured, real gas).
  // Our values are ideal-gas; the real-gas difference at 1 atm is under 1 %, so the tolerance is 0.012.
  it.each([
    ['methane', C_TO_K(15), 1.31],
    ['nitrogen', C_TO_K(15), 1.404],
    ['hydrogen', C_TO_K(15), 1.41],
    ['carbonDioxide', C_TO_K(15), 1.304],
    ['hydrogenSulfide', C_TO_K(15), 1.32],
  ])('should give k of %s near the handbook value', (component, temperatureK, k) => {
    expect(Math.abs(gasProperties({ [component]: 1 }, temperatureK).k - k)).toBeLessThanOrEqual(0.012);
  });

  it('should give k of air near 1.403 (Perry, 17 °C) and a specific gravity of 1', () => {
    const air = gasProperties(AIR as Record<string, number>, C_TO_K(17));
    expect(Math.abs(air.k - 1.403)).toBeLessThanOrEqual(0.012);
    // source: U.S. Standard Atmosphere 1976: molar mass of dry air 28.9644 g/mol
    expectClose(air.molarMassKgPerMol, 0.0289644, 5e-5);
    expectClose(air.specificGravity, 1, 5e-5);
  });

  // source: standard atomic weights (IUPAC): CH4 16.0425 g/mol, H2 2.01588 g/mol
  it('should give the molar mass of pure gases', () => {
    expectClose(gasProperties({ methane: 1 }, 300).molarMassKgPerMol, 0.0160425, 1e-6);
    expectClose(gasProperties({ hydrogen: 1 }, 300).molarMassKgPerMol, 0.00201588, 1e-6);
  });
});

describe('gasProperties: check values of the engineering reference (computed from the NASA polynomials)', () => {
  it.each([
    ['methane', 1.308],
    ['ethane', 1.193],
    ['propane', 1.131],
    ['isobutane', 1.097],
    ['nbutane', 1.095],
    ['nitrogen', 1.4],
    ['carbonDioxide', 1.293],
    ['hydrogenSulfide', 1.323],
    ['hydrogen', 1.407],
  ])('should give k of %s at 15 °C', (component, k) => {
    expectClose(gasProperties({ [component]: 1 }, C_TO_K(15)).k, k, 5e-4);
  });

  it('should follow the methane temperature trend: 1.313 at 0 °C, 1.293 at 50 °C, 1.270 at 100 °C', () => {
    expectClose(gasProperties({ methane: 1 }, C_TO_K(0)).k, 1.313, 5e-4);
    expectClose(gasProperties({ methane: 1 }, C_TO_K(50)).k, 1.293, 5e-4);
    expectClose(gasProperties({ methane: 1 }, C_TO_K(100)).k, 1.27, 5e-4);
  });

  it('should give the pipeline gas M = 18.13 g/mol, SG = 0.6258, Cp = 37.41, k = 1.286 at 15 °C', () => {
    const gas = gasProperties(PIPELINE_GAS, C_TO_K(15));
    expectClose(gas.molarMassKgPerMol * 1000, 18.13);
    expectClose(gas.specificGravity, 0.6258);
    expectClose(gas.cpJPerMolK, 37.41);
    expectClose(gas.k, 1.286);
    expectClose(gasProperties(PIPELINE_GAS, C_TO_K(60)).k, 1.266);
    expectClose(gasProperties(PIPELINE_GAS, C_TO_K(80)).k, 1.257);
    expect(gas.warnings).toEqual([]);
  });

  it('should use the mixture Cp, never the mole-average of pure k (1.297 for this gas)', () => {
    const averaged = Object.entries(PIPELINE_GAS).reduce(
      (sum, [component, y]) => sum + y * gasProperties({ [component]: 1 }, C_TO_K(15)).k,
      0,
    );
    expectClose(averaged, 1.297);
    expect(Math.abs(gasProperties(PIPELINE_GAS, C_TO_K(15)).k - averaged)).toBeGreaterThan(0.01);
  });
});

describe('composition rules', () => {
  it('should normalise a sum within 0.005 of 1 and record the sum', () => {
    const scaled = Object.fromEntries(Object.entries(PIPELINE_GAS).map(([key, y]) => [key, y * 1.004]));
    const gas = gasProperties(scaled, 300);
    expect(gas.sumBeforeNormalisation).toBeCloseTo(1.004, 12);
    expect(gas.k).toBeCloseTo(gasProperties(PIPELINE_GAS, 300).k, 12);
  });

  it('should refuse a sum further from 1, an unknown component and a fraction outside 0..1', () => {
    expectCalcError(() => gasProperties({ methane: 0.9, ethane: 0.09 }, 300), 'E_COMPOSITION_SUM', 'composition');
    const unknown = expectCalcError(
      () => gasProperties({ methane: 0.9, hexanePlus: 0.1 }, 300),
      'E_COMPONENT_UNKNOWN',
      'composition.hexanePlus',
    );
    for (const component of COMPONENTS) expect(unknown.message).toContain(component);
    expectCalcError(
      () => gasProperties({ methane: 1.1, ethane: -0.1 }, 300),
      'E_COMPOSITION_SUM',
      'composition.methane',
    );
  });

  it('should allow pentanes and H2S down to 250 K with a warning, and refuse colder or outside 200–1000 K', () => {
    expect(gasProperties({ methane: 0.99, npentane: 0.01 }, 260).warnings).toEqual(['W_POLY_EXTRAPOLATED']);
    expectCalcError(
      () => gasProperties({ methane: 0.99, hydrogenSulfide: 0.01 }, 240),
      'E_T_POLY_RANGE',
      'temperatureK',
    );
    expect(gasProperties({ methane: 1 }, 210).warnings).toEqual([]);
    expectCalcError(() => gasProperties({ methane: 1 }, 199), 'E_T_POLY_RANGE', 'temperatureK');
    expectCalcError(() => gasProperties({ methane: 1 }, 1001), 'E_T_POLY_RANGE', 'temperatureK');
  });
});
