/**
 * Rod load at the crosshead pin and its reversal.
 * Sign: + = compression (load pushes the crosshead pin toward the crank), − = tension; θ = 0 at head-end dead centre.
 * Gas load F_gas = (p_HE − p_dp)·A_HE − (p_CE − p_dp)·A_CE, with the distance-piece pressure p_dp as reference (the rod
 * section outside the packing sees it). Combined load F = F_gas − m_rec·a, with the exact slider-crank acceleration
 * a = r·ω²·[cos θ + λ·(cos 2θ + λ²·sin⁴θ)/(1 − λ²·sin²θ)^(3/2)] toward the crank.
 * Cylinder pressures: ideal valves, clearance re-expansion and compression along p·Vⁿ.
 * source: slider-crank kinematics (any machine-dynamics text, e.g. Shigley & Uicker, Theory of Machines and
 * Mechanisms, ch. 16); combined load referred to the crosshead pin and reversal as in API Std 618.
 */

import { BORE_MAX_M, CLEARANCE_MAX, CLEARANCE_MIN, SPEED_MAX_RPM, STROKE_MAX_M } from './capacity';
import { requireExponent } from './compression';
import { CalcError, requireRange, show } from './errors';
import { requireAbsolutePressure } from './flow';
import type { Status } from './status';

export interface ReversalCriterion {
  minDegrees: number;
  minFraction: number;
}

/**
 * Default reversal criterion: at least 15° of crank angle, and a reverse peak of at least 3 % of the opposite peak.
 * source: API Std 618, 5th ed. (2007), rod-load reversal clause, as recalled (from memory; the 6th ed., 2024, revised
 * it). Frame makers often demand more: the site configuration sets the frame's own figures.
 */
export const REVERSAL_CRITERION_DEFAULT: Readonly<ReversalCriterion> = { minDegrees: 15, minFraction: 0.03 };

/** Share of a rated load at which the status becomes watch (common practice). */
export const ROD_LOAD_WATCH_FRACTION = 0.9;

/** Angular step of the evaluation, degrees (peaks also evaluated exactly at the valve events). */
export const ROD_LOAD_STEP_DEG = 0.1;
/** Angular step of the returned curve, degrees (for plotting). */
export const ROD_LOAD_CURVE_STEP_DEG = 1;

export interface RodLoadInput {
  boreM: number;
  rodM: number;
  strokeM: number;
  /** Centre-to-centre length of the connecting rod. */
  connectingRodM: number;
  speedRpm: number;
  suctionPressurePa: number;
  dischargePressurePa: number;
  /** Absolute pressure in the distance piece (atmospheric unless it is purged or pressurised). */
  distancePiecePressurePa: number;
  headClearance: number;
  crankClearance: number;
  headActive: boolean;
  crankActive: boolean;
  /** Polytropic exponent of compression and re-expansion (k when nothing better is known). */
  exponent: number;
  /** Piston, rod, nut and crosshead: the mass outboard of the crosshead pin. */
  reciprocatingMassKg: number;
  ratedCompressionN?: number;
  ratedTensionN?: number;
  reversalCriterion?: ReversalCriterion;
}

export interface RodLoadResult {
  gas: { compressionN: number; tensionN: number };
  combined: { compressionN: number; tensionN: number; compressionAtDeg: number; tensionAtDeg: number };
  reversal: { degrees: number; fraction: number; meetsCriterion: boolean };
  status: Status;
  message: string;
  curve: {
    crankDeg: number[];
    headPressurePa: number[];
    crankPressurePa: number[];
    gasN: number[];
    inertiaN: number[];
    combinedN: number[];
  };
  /** Crank angles where the valves open, degrees (absent when that valve never opens). */
  valveEventsDeg: { headSuction?: number; headDischarge?: number; crankDischarge?: number; crankSuction?: number };
}

const DEG = Math.PI / 180;

interface Machine {
  radius: number;
  length: number;
  lambda: number;
  omega: number;
  stroke: number;
  areaHead: number;
  areaCrank: number;
  cHead: number;
  cCrank: number;
  ps: number;
  pd: number;
  pdp: number;
  n: number;
  mass: number;
  headActive: boolean;
  crankActive: boolean;
  vHeadClear: number;
  vHeadMax: number;
  vCrankClear: number;
  vCrankMax: number;
}

/** Piston travel from head-end dead centre, m. */
function travel(m: Machine, thetaRad: number): number {
  const s = Math.sin(thetaRad);
  return m.radius * (1 - Math.cos(thetaRad)) + m.length * (1 - Math.sqrt(1 - m.lambda ** 2 * s * s));
}

/** The crank angle in [0°, 180°] where the piston has travelled x from head-end dead centre. */
function angleAtTravel(m: Machine, x: number): number {
  let low = 0;
  let high = Math.PI;
  for (let step = 0; step < 60; step += 1) {
    const mid = (low + high) / 2;
    if (travel(m, mid) < x) low = mid;
    else high = mid;
  }
  return (low + high) / 2 / DEG;
}

function valveEvents(m: Machine): RodLoadResult['valveEventsDeg'] {
  const events: RodLoadResult['valveEventsDeg'] = {};
  if (m.pd <= m.ps) return events;
  const expand = (m.pd / m.ps) ** (1 / m.n); // re-expansion volume ratio down to suction
  const compress = (m.ps / m.pd) ** (1 / m.n); // compression volume ratio up to discharge
  const inside = (x: number) => x > 0 && x < m.stroke;
  if (m.headActive) {
    const xSuction = m.cHead * m.stroke * (expand - 1);
    if (inside(xSuction)) events.headSuction = angleAtTravel(m, xSuction);
    const xDischarge = m.stroke * (1 + m.cHead) * compress - m.cHead * m.stroke;
    if (inside(xDischarge)) events.headDischarge = 360 - angleAtTravel(m, xDischarge);
  }
  if (m.crankActive) {
    // crank-end volume is A_CE·(C·S + S − x)
    const xDischarge = m.stroke - (m.stroke * (1 + m.cCrank) * compress - m.cCrank * m.stroke);
    if (inside(xDischarge)) events.crankDischarge = angleAtTravel(m, xDischarge);
    const xSuction = m.stroke - m.cCrank * m.stroke * (expand - 1);
    if (inside(xSuction)) events.crankSuction = 360 - angleAtTravel(m, xSuction);
  }
  return events;
}

/** Where in the revolution each end changes from a polytropic process to an open valve (360 = never). */
interface Phases {
  headSuction: number;
  headDischarge: number;
  crankDischarge: number;
  crankSuction: number;
}

interface Point {
  head: number;
  crank: number;
  gas: number;
  inertia: number;
}

/**
 * Pressures and loads at one crank angle in [0°, 360°). The valve events tell which phase each end is in, so the
 * power law is evaluated only while a valve is shut. One square root serves both travel and acceleration.
 */
function evaluateAt(m: Machine, phases: Phases, deg: number, out: Point): void {
  const theta = deg * DEG;
  const sin = Math.sin(theta);
  const cos = Math.cos(theta);
  const l2s2 = m.lambda * m.lambda * sin * sin;
  const root = Math.sqrt(1 - l2s2);
  const x = m.radius * (1 - cos) + m.length * (1 - root);
  // Exact slider-crank acceleration toward the crank; cos 2θ = 1 − 2 sin²θ.
  const acceleration =
    m.radius * m.omega * m.omega * (cos + (m.lambda * (1 - 2 * sin * sin + l2s2 * sin * sin)) / (root * root * root));
  const outStroke = deg <= 180;
  let head = m.ps;
  let crank = m.ps;
  if (m.headActive) {
    if (outStroke)
      head =
        deg < phases.headSuction
          ? Math.max(m.ps, m.pd * (m.vHeadClear / (m.areaHead * (m.cHead * m.stroke + x))) ** m.n)
          : m.ps;
    else
      head =
        deg < phases.headDischarge
          ? Math.min(m.pd, m.ps * (m.vHeadMax / (m.areaHead * (m.cHead * m.stroke + x))) ** m.n)
          : m.pd;
  }
  if (m.crankActive) {
    const vCrank = m.areaCrank * (m.cCrank * m.stroke + (m.stroke - x));
    if (outStroke) crank = deg < phases.crankDischarge ? Math.min(m.pd, m.ps * (m.vCrankMax / vCrank) ** m.n) : m.pd;
    else crank = deg < phases.crankSuction ? Math.max(m.ps, m.pd * (m.vCrankClear / vCrank) ** m.n) : m.ps;
  }
  out.head = head;
  out.crank = crank;
  out.gas = (head - m.pdp) * m.areaHead - (crank - m.pdp) * m.areaCrank;
  out.inertia = -m.mass * acceleration;
}

function phasesOf(events: RodLoadResult['valveEventsDeg']): Phases {
  // A valve that never opens leaves its end on the power law for the whole half turn; the min/max clamps in
  // evaluateAt still hold the pressure between suction and discharge.
  return {
    headSuction: events.headSuction ?? 181,
    headDischarge: events.headDischarge ?? 361,
    crankDischarge: events.crankDischarge ?? 181,
    crankSuction: events.crankSuction ?? 361,
  };
}

/**
 * Longest contiguous arc (degrees, wrapping through 0°) where `sign·load > 0`, with the ends located by linear
 * interpolation between samples sorted by angle over [0°, 360°).
 */
function longestArc(deg: Float64Array, load: Float64Array, sign: 1 | -1): number {
  const count = deg.length;
  let insideCount = 0;
  for (let k = 0; k < count; k += 1) if (sign * (load[k] as number) > 0) insideCount += 1;
  if (insideCount === count) return 360;
  if (insideCount === 0) return 0;
  // Walk once round from a sample that is outside, so that no arc is split by the wrap through 0°.
  let start = 0;
  while (sign * (load[start] as number) > 0) start += 1;
  const crossing = (aAngle: number, aLoad: number, bAngle: number, bLoad: number) => {
    const t = aLoad / (aLoad - bLoad);
    return aAngle + (bAngle - aAngle) * (Number.isFinite(t) ? Math.min(Math.max(t, 0), 1) : 0);
  };
  let longest = 0;
  let arcStart: number | null = null;
  for (let step = 1; step <= count; step += 1) {
    const a = (start + step - 1) % count;
    const b = (start + step) % count;
    const aAngle = (deg[a] as number) + (start + step - 1 >= count ? 360 : 0);
    const bAngle = (deg[b] as number) + (start + step >= count ? 360 : 0);
    const aLoad = load[a] as number;
    const bLoad = load[b] as number;
    const wasInside = sign * aLoad > 0;
    const isInside = sign * bLoad > 0;
    if (!wasInside && isInside) arcStart = crossing(aAngle, aLoad, bAngle, bLoad);
    if (wasInside && !isInside && arcStart !== null) {
      longest = Math.max(longest, crossing(aAngle, aLoad, bAngle, bLoad) - arcStart);
      arcStart = null;
    }
  }
  return longest;
}

function checkInput(i: RodLoadInput): Machine {
  const bore = requireRange('E_GEOMETRY', 'boreM', i.boreM, { min: 0, minOpen: true, max: BORE_MAX_M, unit: 'm' });
  const rod = requireRange('E_GEOMETRY', 'rodM', i.rodM, { min: 0, max: bore, maxOpen: true, unit: 'm' });
  const stroke = requireRange('E_GEOMETRY', 'strokeM', i.strokeM, {
    min: 0,
    minOpen: true,
    max: STROKE_MAX_M,
    unit: 'm',
  });
  const radius = stroke / 2;
  const length = requireRange('E_GEOMETRY', 'connectingRodM', i.connectingRodM, {
    min: radius,
    minOpen: true,
    max: 50 * radius,
    unit: 'm',
  });
  const speed = requireRange('E_GEOMETRY', 'speedRpm', i.speedRpm, {
    min: 0,
    minOpen: true,
    max: SPEED_MAX_RPM,
    unit: 'rpm',
  });
  const ps = requireAbsolutePressure('suctionPressurePa', i.suctionPressurePa);
  const pd = requireAbsolutePressure('dischargePressurePa', i.dischargePressurePa);
  if (pd < ps) {
    throw new CalcError(
      'E_RATIO_LT_1',
      'dischargePressurePa',
      pd,
      `Discharge ${show(pd)} Pa is below suction ${show(ps)} Pa; the ratio must be at least 1. Check both gauges.`,
    );
  }
  const pdp = requireAbsolutePressure('distancePiecePressurePa', i.distancePiecePressurePa);
  const clearance = { min: CLEARANCE_MIN, max: CLEARANCE_MAX };
  const cHead = requireRange('E_CLEARANCE_RANGE', 'headClearance', i.headClearance, clearance);
  const cCrank = requireRange('E_CLEARANCE_RANGE', 'crankClearance', i.crankClearance, clearance);
  if (typeof i.headActive !== 'boolean' || typeof i.crankActive !== 'boolean') {
    throw new CalcError('E_GEOMETRY', 'headActive', i.headActive, 'headActive and crankActive must be true or false.');
  }
  if ((i.headActive && cHead === 0) || (i.crankActive && cCrank === 0)) {
    const field = i.headActive && cHead === 0 ? 'headClearance' : 'crankClearance';
    throw new CalcError(
      'E_CLEARANCE_RANGE',
      field,
      0,
      `${field} = 0: every working end has some clearance volume; enter it.`,
    );
  }
  const n = requireExponent('exponent', i.exponent);
  const mass = requireRange('E_GEOMETRY', 'reciprocatingMassKg', i.reciprocatingMassKg, {
    min: 0,
    max: 1e5,
    unit: 'kg',
  });
  for (const field of ['ratedCompressionN', 'ratedTensionN'] as const) {
    const rated = i[field];
    if (rated !== undefined) requireRange('E_GEOMETRY', field, rated, { min: 0, minOpen: true, max: 1e8, unit: 'N' });
  }
  const criterion = i.reversalCriterion;
  if (criterion) {
    requireRange('E_GEOMETRY', 'reversalCriterion.minDegrees', criterion.minDegrees, { min: 0, max: 180 });
    requireRange('E_GEOMETRY', 'reversalCriterion.minFraction', criterion.minFraction, { min: 0, max: 1 });
  }
  const areaHead = (Math.PI / 4) * bore ** 2;
  const areaCrank = (Math.PI / 4) * (bore ** 2 - rod ** 2);
  return {
    radius,
    length,
    lambda: radius / length,
    omega: (2 * Math.PI * speed) / 60,
    stroke,
    areaHead,
    areaCrank,
    vHeadClear: areaHead * cHead * stroke,
    vHeadMax: areaHead * stroke * (1 + cHead),
    vCrankClear: areaCrank * cCrank * stroke,
    vCrankMax: areaCrank * stroke * (1 + cCrank),
    cHead,
    cCrank,
    ps,
    pd,
    pdp,
    n,
    mass,
    headActive: i.headActive,
    crankActive: i.crankActive,
  };
}

const kN = (newtons: number) => `${(newtons / 1000).toFixed(1)} kN`;

/** Gas and combined rod load over a revolution, reversal and status against the frame's ratings. */
export function rodLoad(i: RodLoadInput): RodLoadResult {
  const m = checkInput(i);
  const criterion = i.reversalCriterion ?? REVERSAL_CRITERION_DEFAULT;
  const events = valveEvents(m);
  const steps = Math.round(360 / ROD_LOAD_STEP_DEG);
  // The 0.1° grid with the valve events merged in, in order (the events are few, so no sort is needed).
  const eventAngles = Object.values(events).sort((x, y) => x - y);
  const angles = new Float64Array(steps + eventAngles.length);
  let next = 0;
  let filled = 0;
  for (let index = 0; index < steps; index += 1) {
    const gridDeg = index * ROD_LOAD_STEP_DEG;
    while (next < eventAngles.length && (eventAngles[next] as number) < gridDeg)
      angles[filled++] = eventAngles[next++] as number;
    angles[filled++] = gridDeg;
  }
  while (next < eventAngles.length) angles[filled++] = eventAngles[next++] as number;
  const phases = phasesOf(events);
  const combinedLoads = new Float64Array(angles.length);
  const point: Point = { head: 0, crank: 0, gas: 0, inertia: 0 };
  let gasCompression = 0;
  let gasTension = 0;
  let compressionPeak = 0;
  let compressionDeg = 0;
  let tensionPeak = 0;
  let tensionDeg = 0;
  for (let index = 0; index < angles.length; index += 1) {
    const deg = angles[index] as number;
    evaluateAt(m, phases, deg, point);
    const combined = point.gas + point.inertia;
    combinedLoads[index] = combined;
    if (point.gas > gasCompression) gasCompression = point.gas;
    if (-point.gas > gasTension) gasTension = -point.gas;
    if (combined > compressionPeak) {
      compressionPeak = combined;
      compressionDeg = deg;
    }
    if (-combined > tensionPeak) {
      tensionPeak = -combined;
      tensionDeg = deg;
    }
  }
  const compression = { value: compressionPeak, deg: compressionDeg };
  const tension = { value: tensionPeak, deg: tensionDeg };

  const minority: 1 | -1 = tension.value <= compression.value ? -1 : 1;
  const majorityPeak = Math.max(compression.value, tension.value);
  const minorityPeak = Math.min(compression.value, tension.value);
  const reversesAtAll = compression.value > 0 && tension.value > 0;
  const degrees = reversesAtAll ? longestArc(angles, combinedLoads, minority) : 0;
  const fraction = reversesAtAll && majorityPeak > 0 ? minorityPeak / majorityPeak : 0;
  const meetsCriterion = reversesAtAll && degrees >= criterion.minDegrees && fraction >= criterion.minFraction;

  const reasons: string[] = [];
  let status: Status = 'ok';
  const raise = (to: Status) => {
    if (to === 'alarm' || status === 'ok') status = to;
  };
  if (!reversesAtAll) {
    raise('alarm');
    reasons.push(
      'The load never reverses: the crosshead pin bushing gets no fresh oil film and will overheat. Check the operating point (ratio, unloaded ends) against the frame maker’s limits.',
    );
  } else if (!meetsCriterion) {
    raise('alarm');
    reasons.push(
      `Reversal too weak: ${degrees.toFixed(1)}° at ${(fraction * 100).toFixed(1)} % of the opposite peak (needs ${criterion.minDegrees}° and ${(criterion.minFraction * 100).toFixed(1)} %). The crosshead pin may starve of oil.`,
    );
  }
  const checkRating = (label: string, load: number, rated: number | undefined) => {
    if (rated === undefined) return;
    if (load >= rated) {
      raise('alarm');
      reasons.push(`${label} ${kN(load)} reaches the rating ${kN(rated)}.`);
    } else if (load >= ROD_LOAD_WATCH_FRACTION * rated) {
      raise('watch');
      reasons.push(`${label} ${kN(load)} is ${Math.round((100 * load) / rated)} % of the rating ${kN(rated)}.`);
    }
  };
  checkRating('Combined compression', compression.value, i.ratedCompressionN);
  checkRating('Gas compression', gasCompression, i.ratedCompressionN);
  checkRating('Combined tension', tension.value, i.ratedTensionN);
  checkRating('Gas tension', gasTension, i.ratedTensionN);
  const summary = `Peak compression ${kN(compression.value)} at ${compression.deg.toFixed(1)}°, peak tension ${kN(tension.value)} at ${tension.deg.toFixed(1)}°; reversal ${degrees.toFixed(1)}° at ${(fraction * 100).toFixed(1)} %.`;
  const message = reasons.length ? `${reasons.join(' ')} ${summary}` : `Rod load within limits. ${summary}`;

  const curve: RodLoadResult['curve'] = {
    crankDeg: [],
    headPressurePa: [],
    crankPressurePa: [],
    gasN: [],
    inertiaN: [],
    combinedN: [],
  };
  for (let deg = 0; deg < 360; deg += ROD_LOAD_CURVE_STEP_DEG) {
    evaluateAt(m, phases, deg, point);
    curve.crankDeg.push(deg);
    curve.headPressurePa.push(point.head);
    curve.crankPressurePa.push(point.crank);
    curve.gasN.push(point.gas);
    curve.inertiaN.push(point.inertia);
    curve.combinedN.push(point.gas + point.inertia);
  }

  return {
    gas: { compressionN: gasCompression, tensionN: gasTension },
    combined: {
      compressionN: compression.value,
      tensionN: tension.value,
      compressionAtDeg: compression.deg,
      tensionAtDeg: tension.deg,
    },
    reversal: { degrees, fraction, meetsCriterion },
    status,
    message,
    curve,
    valveEventsDeg: events,
  };
}
