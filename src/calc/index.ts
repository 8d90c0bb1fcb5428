/**
 * The public list of engineering calculations. SI units in and out (Pa absolute unless named gauge, K, m, s, kg,
 * N, W, m³/s; fractions, not percent). Invalid input throws CalcError; no function returns NaN or Infinity.
 */
export { barometricPressure, ELEVATION_MAX_M, ELEVATION_MIN_M } from './barometer';
export {
  assessBearingTemperature,
  BEARING_LIMITS_DEFAULT,
  type BearingClearanceInput,
  type BearingClearanceResult,
  type BearingLimits,
  type BearingTemperatureAssessment,
  type BearingTemperatureInput,
  bearingClearance,
  CLEARANCE_RULE_MAX,
  CLEARANCE_RULE_MIN,
} from './bearings';
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
  RIDER_BAND_ALARM_FRACTION,
  RIDER_BAND_WATCH_FRACTION,
  type RiderBandInput,
  type RiderBandResult,
  riderBandWear,
} from './rider-band';
export {
  REVERSAL_CRITERION_DEFAULT,
  type ReversalCriterion,
  ROD_LOAD_WATCH_FRACTION,
  type RodLoadInput,
  type RodLoadResult,
  rodLoad,
} from './rod-load';
export {
  type EndPerformance,
  goldenMaximum,
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
  fitToLimit,
  type TimeToLimitInput,
  type TimeToLimitResult,
  TREND_MIN_R_SQUARED,
  timeToLimit,
} from './trend';
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
export {
  assessValveCovers,
  VALVE_COVER_THRESHOLDS,
  type ValveCoverAssessment,
  type ValveCoverFinding,
  type ValveCoverInput,
  type ValveCoverReading,
  type ValveCoverThresholds,
} from './valve-covers';
export {
  type ValveChange,
  type ValveLifeInput,
  type ValveLifeResult,
  valveLife,
} from './valve-life';
