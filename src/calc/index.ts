/**
 * The public list of engineering calculations. SI units in and out (Pa absolute unless named gauge, K, m, s, kg,
 * N, W, m³/s; fractions, not percent). Invalid input throws CalcError; no function returns NaN or Infinity.
 */
export { barometricPressure, ELEVATION_MAX_M, ELEVATION_MIN_M } from './barometer';
export {
  type ActiveEnds,
  CLEARANCE_MAX,
  CLEARANCE_MIN,
  type Displacement,
  type DisplacementInput,
  pistonDisplacement,
  VE_EMPIRICAL_CONSTANT_DEFAULT,
  type VeMethod,
  type VolumetricEfficiencyInput,
  volumetricEfficiency,
} from './capacity';
export { K_MAX, K_MIN, RATIO_HIGH, REAL_GAS_PRESSURE_PA } from './compression';
export { R_MOLAR, STANDARD_ATMOSPHERE_PA } from './constants';
export {
  APPARENT_EXPONENT_MAX,
  assessDischargeTemperature,
  DISCHARGE_EXCESS_THRESHOLDS,
  type DischargeAssessment,
  type DischargeAssessmentInput,
  type DischargeExcessThresholds,
  type DischargeTemperatureInput,
  type DischargeTemperatureResult,
  dischargeTemperature,
} from './discharge-temperature';
export {
  CALC_ERROR_CODES,
  CALC_WARNING_CODES,
  CalcError,
  type CalcErrorCode,
  type CalcWarningCode,
} from './errors';
export {
  actualFlow,
  convertStandardFlow,
  fromMMSCFD,
  fromSCFM,
  molarFlowFromStandard,
  type ReferenceState,
  STANDARD_STATES,
  type StandardBasis,
  standardFlow,
  standardFromMolarFlow,
  toMMSCFD,
  toSCFM,
} from './flow';
export {
  AIR,
  COMPONENTS,
  type Component,
  type Composition,
  type GasProperties,
  gasProperties,
} from './gas';
export {
  COMPRESSION_EFFICIENCY_DEFAULT,
  type IsentropicPowerInput,
  isentropicPower,
  MECHANICAL_EFFICIENCY_DEFAULT,
} from './power';
export {
  firstStageRecycle,
  type RecycleCase,
  type RecycleInput,
  type RecycleResult,
  type RecycleStageInput,
  type RecycleStageResult,
  recycleFraction,
} from './recycle';
export {
  type EndPerformance,
  POWER_CURVE_POINTS,
  type PowerCurve,
  type PowerCurvePoint,
  powerCurve,
  type StageInput,
  type StagePerformance,
  stagePerformance,
} from './stage';
export { STATUS_ORDER, type Status, worstStatus } from './status';
export {
  deltaFromSI,
  deltaToSI,
  fromSI,
  type Quantity,
  SI_UNIT,
  toSI,
  UNITS,
  type UnitInfo,
  unitInfo,
} from './units';
