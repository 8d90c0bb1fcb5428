/**
 * Ideal-gas properties of a mixture from its mole fractions.
 * Cp°/R = a1 + a2·T + a3·T² + a4·T³ + a5·T⁴ per species (NASA 7-coefficient polynomials, low-temperature range);
 * Cp_mix = Σ yᵢ·Cpᵢ, k = Cp_mix / (Cp_mix − R). Never mole-average the pure-gas k values.
 * source: Gordon & McBride, NASA SP-273 (1971); McBride, Gordon & Reno, NASA TM-4513 (1993), coefficients as
 * distributed in the open NASA Glenn thermodynamic data file.
 */
import { AIR_MOLAR_MASS_KG_PER_MOL, R_MOLAR } from './constants';
import { CalcError, type CalcWarningCode, requireFinite, requireRange, show } from './errors';

export const COMPONENTS = [
  'methane',
  'ethane',
  'propane',
  'isobutane',
  'nbutane',
  'isopentane',
  'npentane',
  'nitrogen',
  'oxygen',
  'argon',
  'carbonDioxide',
  'hydrogenSulfide',
  'hydrogen',
  'water',
] as const;
export type Component = (typeof COMPONENTS)[number];
export type Composition = Partial<Record<Component, number>>;

interface Species {
  formula: string;
  /** g/mol; from standard atomic weights (C 12.0107, H 1.00794, N 14.0067, O 15.9994, S 32.065, Ar 39.948). */
  molarMassGPerMol: number;
  a: readonly [number, number, number, number, number];
  /** Lower limit of the fitted range, K; the upper limit is 1000 K for all. */
  fittedFromK: number;
}

const SPECIES: Readonly<Record<Component, Species>> = {
  methane: {
    formula: 'CH4',
    molarMassGPerMol: 16.0425,
    fittedFromK: 200,
    a: [5.14987613, -1.36709788e-2, 4.91800599e-5, -4.84743026e-8, 1.66693956e-11],
  },
  ethane: {
    formula: 'C2H6',
    molarMassGPerMol: 30.069,
    fittedFromK: 200,
    a: [4.29142492, -5.5015427e-3, 5.99438288e-5, -7.08466285e-8, 2.68685771e-11],
  },
  propane: {
    formula: 'C3H8',
    molarMassGPerMol: 44.0956,
    fittedFromK: 200,
    a: [4.2110262, 1.71599803e-3, 7.06183472e-5, -9.19594116e-8, 3.64421372e-11],
  },
  isobutane: {
    formula: 'i-C4H10',
    molarMassGPerMol: 58.1222,
    fittedFromK: 200,
    a: [4.45479276, 8.26057985e-3, 8.29886664e-5, -1.14647642e-7, 4.64570101e-11],
  },
  nbutane: {
    formula: 'n-C4H10',
    molarMassGPerMol: 58.1222,
    fittedFromK: 200,
    a: [6.14746806, 1.55947389e-4, 9.67913517e-5, -1.2548391e-7, 4.97816555e-11],
  },
  isopentane: {
    formula: 'i-C5H12',
    molarMassGPerMol: 72.1488,
    fittedFromK: 298.15,
    a: [1.0832882, 4.4571076e-2, 8.2389934e-6, -3.5258047e-8, 1.5785762e-11],
  },
  npentane: {
    formula: 'n-C5H12',
    molarMassGPerMol: 72.1488,
    fittedFromK: 298.15,
    a: [1.8983679, 4.1203037e-2, 1.2312175e-5, -3.6589501e-8, 1.5042509e-11],
  },
  nitrogen: {
    formula: 'N2',
    molarMassGPerMol: 28.0134,
    fittedFromK: 200,
    a: [3.53100528, -1.23660987e-4, -5.02999437e-7, 2.43530612e-9, -1.40881235e-12],
  },
  oxygen: {
    formula: 'O2',
    molarMassGPerMol: 31.9988,
    fittedFromK: 200,
    a: [3.78245636, -2.99673415e-3, 9.847302e-6, -9.68129508e-9, 3.24372836e-12],
  },
  argon: { formula: 'Ar', molarMassGPerMol: 39.948, fittedFromK: 200, a: [2.5, 0, 0, 0, 0] },
  carbonDioxide: {
    formula: 'CO2',
    molarMassGPerMol: 44.0095,
    fittedFromK: 200,
    a: [2.35677352, 8.98459677e-3, -7.12356269e-6, 2.45919022e-9, -1.43699548e-13],
  },
  hydrogenSulfide: {
    formula: 'H2S',
    molarMassGPerMol: 34.0809,
    fittedFromK: 300,
    a: [3.9323476, -5.0260905e-4, 4.5928473e-6, -3.1807214e-9, 6.6497561e-13],
  },
  hydrogen: {
    formula: 'H2',
    molarMassGPerMol: 2.01588,
    fittedFromK: 200,
    a: [2.34433112, 7.98052075e-3, -1.9478151e-5, 2.01572094e-8, -7.37611761e-12],
  },
  water: {
    formula: 'H2O',
    molarMassGPerMol: 18.0153,
    fittedFromK: 200,
    a: [4.19864056, -2.0364341e-3, 6.52040211e-6, -5.48797062e-9, 1.77197817e-12],
  },
};

/** Dry air, mole fractions. source: U.S. Standard Atmosphere 1976, table 3 (N2, O2, Ar, CO2; trace gases omitted). */
export const AIR: Readonly<Composition> = {
  nitrogen: 0.78084,
  oxygen: 0.209476,
  argon: 0.00934,
  carbonDioxide: 0.000314,
};

/** The polynomials hold from 200 K to 1000 K. */
export const POLY_MIN_K = 200;
export const POLY_MAX_K = 1000;
/** Species fitted only from 298.15 K or 300 K may be used down to this temperature, with a warning (common practice). */
export const EXTRAPOLATION_MIN_K = 250;
/** |Σy − 1| up to this is normalised silently; more is refused. */
export const COMPOSITION_SUM_TOLERANCE = 0.005;

export interface NormalisedComposition {
  fractions: ReadonlyArray<readonly [Component, number]>;
  /** Σy as entered, before normalisation. */
  sumBeforeNormalisation: number;
}

/** Checks a composition and scales it to Σy = 1. */
export function normaliseComposition(composition: Record<string, number>): NormalisedComposition {
  if (typeof composition !== 'object' || composition === null) {
    throw new CalcError(
      'E_COMPOSITION_SUM',
      'composition',
      composition,
      'composition must be an object of mole fractions.',
    );
  }
  const entries: Array<[Component, number]> = [];
  let sum = 0;
  for (const [key, value] of Object.entries(composition)) {
    if (!(key in SPECIES)) {
      throw new CalcError(
        'E_COMPONENT_UNKNOWN',
        `composition.${key}`,
        key,
        `Component "${key}" is not supported; use ${COMPONENTS.join(', ')} (heavier fractions such as hexanes-plus are not modelled).`,
      );
    }
    requireRange('E_COMPOSITION_SUM', `composition.${key}`, value, { min: 0, max: 1 });
    sum += value;
    if (value > 0) entries.push([key as Component, value]);
  }
  if (Math.abs(sum - 1) > COMPOSITION_SUM_TOLERANCE) {
    throw new CalcError(
      'E_COMPOSITION_SUM',
      'composition',
      sum,
      `The mole fractions add up to ${show(sum)}; they must add up to 1 within ±${COMPOSITION_SUM_TOLERANCE}. Check the gas analysis.`,
    );
  }
  return { fractions: entries.map(([key, value]) => [key, value / sum] as const), sumBeforeNormalisation: sum };
}

/**
 * A composition reduced to one polynomial: Σ yᵢ·(a1..a5)ᵢ is itself a Cp°/R polynomial, so a mixture costs no
 * more to evaluate than a pure gas. Prepare once, evaluate at many temperatures.
 */
export interface Mixture {
  coefficients: readonly [number, number, number, number, number];
  molarMassKgPerMol: number;
  /** Highest lower fitting limit among the components present, K (below it: W_POLY_EXTRAPOLATED). */
  fittedFromK: number;
  /** The component that sets fittedFromK, for the message. */
  limitingComponent: Component;
  sumBeforeNormalisation: number;
  carbonDioxideFraction: number;
}

export function prepareMixture(composition: Record<string, number>): Mixture {
  const normalised = normaliseComposition(composition);
  const coefficients: [number, number, number, number, number] = [0, 0, 0, 0, 0];
  let molarMassG = 0;
  let fittedFromK = POLY_MIN_K;
  let limitingComponent: Component = 'methane';
  let carbonDioxideFraction = 0;
  for (const [component, y] of normalised.fractions) {
    const species = SPECIES[component];
    molarMassG += y * species.molarMassGPerMol;
    species.a.forEach((a, index) => {
      coefficients[index] = (coefficients[index] as number) + y * a;
    });
    if (species.fittedFromK > fittedFromK) {
      fittedFromK = species.fittedFromK;
      limitingComponent = component;
    }
    if (component === 'carbonDioxide') carbonDioxideFraction = y;
  }
  return {
    coefficients,
    molarMassKgPerMol: molarMassG / 1000,
    fittedFromK,
    limitingComponent,
    sumBeforeNormalisation: normalised.sumBeforeNormalisation,
    carbonDioxideFraction,
  };
}

/** Ideal-gas Cp of a prepared mixture, J/(mol·K); checks the temperature against the data range. */
export function mixtureCp(mixture: Mixture, temperatureK: number, warnings: CalcWarningCode[]): number {
  requireRange('E_T_POLY_RANGE', 'temperatureK', temperatureK, { min: POLY_MIN_K, max: POLY_MAX_K, unit: 'K' });
  if (temperatureK < mixture.fittedFromK) {
    if (temperatureK < EXTRAPOLATION_MIN_K) {
      const species = SPECIES[mixture.limitingComponent];
      throw new CalcError(
        'E_T_POLY_RANGE',
        'temperatureK',
        temperatureK,
        `temperatureK = ${show(temperatureK)} K is below the data range of ${mixture.limitingComponent} (${species.formula}); it must be at least ${EXTRAPOLATION_MIN_K} K.`,
      );
    }
    if (!warnings.includes('W_POLY_EXTRAPOLATED')) warnings.push('W_POLY_EXTRAPOLATED');
  }
  const [a1, a2, a3, a4, a5] = mixture.coefficients;
  const t = temperatureK;
  return (a1 + t * (a2 + t * (a3 + t * (a4 + t * a5)))) * R_MOLAR;
}

/** Ideal-gas k = Cp/(Cp − R) of a prepared mixture. */
export function mixtureK(mixture: Mixture, temperatureK: number, warnings: CalcWarningCode[]): number {
  const cp = mixtureCp(mixture, temperatureK, warnings);
  return cp / (cp - R_MOLAR);
}

export interface GasProperties {
  molarMassKgPerMol: number;
  /** Ideal specific gravity, M_mix / M_air (M_air = 28.9644 g/mol, U.S. Standard Atmosphere 1976). */
  specificGravity: number;
  /** Ideal-gas molar heat capacity at constant pressure, J/(mol·K). */
  cpJPerMolK: number;
  /** Ideal-gas ratio of specific heats Cp/Cv. */
  k: number;
  warnings: CalcWarningCode[];
  /** Σy as entered; the properties use the composition scaled to Σy = 1. */
  sumBeforeNormalisation: number;
}

/** Ideal-gas mixture properties at `temperatureK` (200–1000 K). */
export function gasProperties(composition: Record<string, number>, temperatureK: number): GasProperties {
  requireFinite('temperatureK', temperatureK);
  const mixture = prepareMixture(composition);
  const warnings: CalcWarningCode[] = [];
  const cp = mixtureCp(mixture, temperatureK, warnings);
  return {
    molarMassKgPerMol: mixture.molarMassKgPerMol,
    specificGravity: mixture.molarMassKgPerMol / AIR_MOLAR_MASS_KG_PER_MOL,
    cpJPerMolK: cp,
    k: cp / (cp - R_MOLAR),
    warnings,
    sumBeforeNormalisation: mixture.sumBeforeNormalisation,
  };
}
