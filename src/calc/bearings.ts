/**
 * Plain (babbitt-lined) bearings: temperature checks on rounds and clearance checks at overhauls.
 * Temperature checks: absolute metal temperature, rise over oil supply, rise and rate since the previous round,
 * and (for mains) the difference from the other mains. Thresholds are common practice; the frame maker's limits
 * govern and the site configuration sets them.
 */
import { CalcError, type CalcWarningCode, requireRange, show } from './errors';
import { median } from './stats';
import type { Status } from './status';
import { worstStatus } from './status';
import { MS_PER_HOUR, parseTime } from './time';

const C = (celsius: number) => celsius + 273.15;

/** Bearing readings outside −40 °C to 200 °C are refused as misreadings (common practice). */
export const BEARING_TEMPERATURE_MIN_K = C(-40);
export const BEARING_TEMPERATURE_MAX_K = C(200);
/** Oil supply this much hotter than the bearing means a misplaced or failed sensor (common practice). */
export const OIL_ABOVE_BEARING_SUSPECT_K = 5;

export interface BearingLimits {
  alarmK?: number;
  tripK?: number;
  riseOverOilWatchK?: number;
  riseOverOilAlarmK?: number;
  roundRiseWatchK?: number;
  roundRiseAlarmK?: number;
  rateWatchKPerH?: number;
  rateAlarmKPerH?: number;
  peerWatchK?: number;
  peerAlarmK?: number;
}

/**
 * Defaults where the configuration gives none (common practice). The absolute 93 °C / 104 °C (200 °F / 220 °F) are
 * placeholders for main and crankpin metal temperature: the frame maker's values govern.
 */
export const BEARING_LIMITS_DEFAULT: Readonly<Required<BearingLimits>> = {
  alarmK: C(93),
  tripK: C(104),
  riseOverOilWatchK: 30,
  riseOverOilAlarmK: 40,
  roundRiseWatchK: 5,
  roundRiseAlarmK: 10,
  rateWatchKPerH: 2,
  rateAlarmKPerH: 5,
  peerWatchK: 8,
  peerAlarmK: 15,
};

export interface BearingTemperatureInput {
  temperatureK: number;
  /** Oil supply header temperature after cooler and filter. */
  oilSupplyK?: number;
  previous?: { temperatureK: number; at: string };
  /** ISO time of this reading. */
  at: string;
  /** The other main bearings' temperatures this round. */
  peersK?: number[];
  limits: BearingLimits;
}

export interface BearingTemperatureAssessment {
  status: Status;
  riseOverOilK: number | null;
  riseSincePreviousK: number | null;
  rateKPerH: number | null;
  peerDeltaK: number | null;
  message: string;
  warnings: CalcWarningCode[];
}

function bearingTemperature(field: string, value: number): number {
  return requireRange('E_TEMP_RANGE', field, value, {
    min: BEARING_TEMPERATURE_MIN_K,
    max: BEARING_TEMPERATURE_MAX_K,
    unit: 'K',
  });
}

const kelvins = (value: number) => `${value.toFixed(1)} K`;
const celsius = (kelvin: number) => `${(kelvin - 273.15).toFixed(1)} °C`;

/** All temperature checks of one bearing reading, worst status first in the message. */
export function assessBearingTemperature(i: BearingTemperatureInput): BearingTemperatureAssessment {
  const t = bearingTemperature('temperatureK', i.temperatureK);
  const now = parseTime('at', i.at);
  const limits = { ...BEARING_LIMITS_DEFAULT, ...i.limits };
  for (const [field, value] of Object.entries(i.limits ?? {})) {
    if (value !== undefined) requireRange('E_TEMP_RANGE', `limits.${field}`, value, { min: 0, max: 1000 });
  }
  const warnings: CalcWarningCode[] = [];
  const reasons: Array<{ status: Status; text: string }> = [];
  const judge = (value: number, watch: number | undefined, alarm: number | undefined, text: string) => {
    if (alarm !== undefined && value >= alarm) reasons.push({ status: 'alarm', text });
    else if (watch !== undefined && value >= watch) reasons.push({ status: 'watch', text });
  };

  if (t >= limits.tripK)
    reasons.push({ status: 'trip', text: `${celsius(t)} is at or above the trip ${celsius(limits.tripK)}` });
  else if (t >= limits.alarmK)
    reasons.push({ status: 'alarm', text: `${celsius(t)} is at or above the alarm ${celsius(limits.alarmK)}` });

  let riseOverOilK: number | null = null;
  if (i.oilSupplyK !== undefined) {
    const oil = bearingTemperature('oilSupplyK', i.oilSupplyK);
    riseOverOilK = t - oil;
    if (-riseOverOilK > OIL_ABOVE_BEARING_SUSPECT_K) warnings.push('W_SENSOR_SUSPECT');
    judge(
      riseOverOilK,
      limits.riseOverOilWatchK,
      limits.riseOverOilAlarmK,
      `${kelvins(riseOverOilK)} above the oil supply (normal 10–25 K): oil starvation, overload or wear`,
    );
  }

  let riseSincePreviousK: number | null = null;
  let rateKPerH: number | null = null;
  if (i.previous) {
    const before = bearingTemperature('previous.temperatureK', i.previous.temperatureK);
    const then = parseTime('previous.at', i.previous.at);
    if (then >= now) {
      throw new CalcError(
        'E_TIME_ORDER',
        'previous.at',
        i.previous.at,
        `The previous reading (${i.previous.at}) is not before this one (${i.at}); the time between rounds must be positive.`,
      );
    }
    riseSincePreviousK = t - before;
    rateKPerH = riseSincePreviousK / ((now - then) / MS_PER_HOUR);
    judge(
      riseSincePreviousK,
      limits.roundRiseWatchK,
      limits.roundRiseAlarmK,
      `${kelvins(riseSincePreviousK)} up since the last round`,
    );
    judge(rateKPerH, limits.rateWatchKPerH, limits.rateAlarmKPerH, `rising ${rateKPerH.toFixed(2)} K/h`);
  }

  let peerDeltaK: number | null = null;
  if (i.peersK && i.peersK.length > 0) {
    const peers = i.peersK.map((value, index) => bearingTemperature(`peersK[${index}]`, value));
    peerDeltaK = t - median(peers);
    judge(peerDeltaK, limits.peerWatchK, limits.peerAlarmK, `${kelvins(peerDeltaK)} above the other mains`);
  }

  const status = reasons.reduce<Status>((worst, reason) => worstStatus(worst, reason.status), 'ok');
  const ordered = [...reasons].sort(
    (a, b) => ['ok', 'watch', 'alarm', 'trip'].indexOf(b.status) - ['ok', 'watch', 'alarm', 'trip'].indexOf(a.status),
  );
  let message = ordered.length
    ? `Bearing ${celsius(t)}: ${ordered.map((reason) => reason.text).join('; ')}.`
    : `Bearing ${celsius(t)}: within limits.`;
  if (warnings.includes('W_SENSOR_SUSPECT')) {
    message += ' The oil supply reads hotter than the bearing: check both sensors and where they sit.';
  }
  if (status === 'alarm' || status === 'trip') {
    message += ' Follow the site procedure for a hot bearing; do not open the crankcase while the machine can turn.';
  }
  return { status, riseOverOilK, riseSincePreviousK, rateKPerH, peerDeltaK, message, warnings };
}

/** Rule of thumb: diametral clearance about 1 ‰ of the journal diameter; outside 0.5–2.0 ‰ re-measure (common practice). */
export const CLEARANCE_RULE_MIN = 0.0005;
export const CLEARANCE_RULE_MAX = 0.002;

export interface BearingClearanceInput {
  /** Measured diametral clearance. */
  measuredM: number;
  journalDiameterM: number;
  /** OEM new clearance range and wear limit; they govern. */
  specMinM?: number;
  specMaxM?: number;
  wearLimitM?: number;
}

export interface BearingClearanceResult {
  /** Clearance per unit of journal diameter (0.001 = 1 ‰ = 1 mil per inch). */
  perDiameter: number;
  status: Status;
  message: string;
  warnings: CalcWarningCode[];
}

const mm = (metres: number) => `${(metres * 1000).toFixed(3)} mm`;

/** A measured journal bearing clearance against the OEM range, with the rule-of-thumb plausibility check. */
export function bearingClearance(i: BearingClearanceInput): BearingClearanceResult {
  const journal = requireRange('E_GEOMETRY', 'journalDiameterM', i.journalDiameterM, {
    min: 0,
    minOpen: true,
    max: 3,
    unit: 'm',
  });
  const measured = requireRange('E_GEOMETRY', 'measuredM', i.measuredM, {
    min: 0,
    minOpen: true,
    max: journal / 10,
    unit: 'm',
  });
  const specMin =
    i.specMinM === undefined
      ? undefined
      : requireRange('E_GEOMETRY', 'specMinM', i.specMinM, { min: 0, max: journal / 10, unit: 'm' });
  const specMax =
    i.specMaxM === undefined
      ? undefined
      : requireRange('E_GEOMETRY', 'specMaxM', i.specMaxM, { min: specMin ?? 0, max: journal / 10, unit: 'm' });
  const wearLimit =
    i.wearLimitM === undefined
      ? undefined
      : requireRange('E_GEOMETRY', 'wearLimitM', i.wearLimitM, {
          min: specMax ?? specMin ?? 0,
          max: journal / 10,
          unit: 'm',
        });
  const perDiameter = measured / journal;
  const warnings: CalcWarningCode[] = [];
  const ruleNote = `${(perDiameter * 1000).toFixed(3)} ‰ of the journal`;
  if (perDiameter < CLEARANCE_RULE_MIN || perDiameter > CLEARANCE_RULE_MAX) warnings.push('W_CHECK_MEASUREMENT');

  let status: Status = 'ok';
  let message: string;
  if (wearLimit !== undefined && measured > wearLimit) {
    status = 'alarm';
    message = `${mm(measured)} (${ruleNote}) is beyond the wear limit ${mm(wearLimit)}: renew or refit the bearing per the frame maker.`;
  } else if (specMax !== undefined && measured > specMax) {
    status = 'watch';
    message = `${mm(measured)} (${ruleNote}) is above the new range maximum ${mm(specMax)}: worn; record it and plan the repair.`;
  } else if (specMin !== undefined && measured < specMin) {
    status = 'watch';
    message = `${mm(measured)} (${ruleNote}) is below the minimum ${mm(specMin)}: tight. Re-measure; check the shell, the cap seating and the bolt torque.`;
  } else if (specMin !== undefined || specMax !== undefined) {
    message = `${mm(measured)} (${ruleNote}) is within the maker's range.`;
  } else {
    message = `${mm(measured)} (${ruleNote}). No maker's range given: the rule of about 1 ‰ of the diameter is only a plausibility check.`;
  }
  if (warnings.length) {
    // With a maker's range, it governs; without one, an implausible figure is worth a second look.
    if (specMin === undefined && specMax === undefined && wearLimit === undefined)
      status = worstStatus(status, 'watch');
    message += ` Outside the usual 0.5–2.0 ‰ of the diameter: check the measurement (${show(measured)} m on a ${show(journal)} m journal).`;
  }
  return { perDiameter, status, message, warnings };
}
