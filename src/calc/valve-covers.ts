/**
 * Valve cover temperatures: finding the leaking valve once the discharge temperature says something leaks.
 * A leaking valve passes hot gas back and forth; the throttled gas heats that valve and its cover.
 * Δpeer = T_cover − median(other covers of the same service on the cylinder); Δgas = T_cover − T_gas at the nozzle.
 * Thresholds and pattern meanings are common practice: there is no single published source.
 */
import { CalcError, requireRange } from './errors';
import { median } from './stats';
import type { Status } from './status';
import { worstStatus } from './status';

export interface ValveCoverThresholds {
  /** Cover above its peers' median, K. */
  peerWatchK: number;
  peerAlarmK: number;
  /** Discharge cover above the discharge gas, K (watch is strictly above this). */
  dischargeAboveGasWatchK: number;
  dischargeAboveGasAlarmK: number;
  /** Suction cover above the suction gas, K. */
  suctionAboveGasWatchK: number;
  suctionAboveGasAlarmK: number;
}

/** Tool defaults (common practice); a site may set its own per machine. */
export const VALVE_COVER_THRESHOLDS: Readonly<ValveCoverThresholds> = {
  peerWatchK: 8,
  peerAlarmK: 14,
  dischargeAboveGasWatchK: 0,
  dischargeAboveGasAlarmK: 10,
  suctionAboveGasWatchK: 20,
  suctionAboveGasAlarmK: 35,
};

/** Plausible cover temperatures, K (−40 °C to 250 °C). */
export const COVER_TEMPERATURE_MIN_K = 233.15;
export const COVER_TEMPERATURE_MAX_K = 523.15;

export interface ValveCoverReading {
  /** Valve position, e.g. `C1-HE-S1`. */
  id: string;
  end: 'head' | 'crank';
  service: 'suction' | 'discharge';
  temperatureK: number;
}

export interface ValveCoverInput {
  /** All covers read on one cylinder this round. */
  covers: ValveCoverReading[];
  suctionGasK?: number;
  dischargeGasK?: number;
  thresholds?: Partial<ValveCoverThresholds>;
}

export interface ValveCoverFinding {
  id: string;
  /** Above the median of the other covers of the same service; null with no peer. */
  peerDeltaK: number | null;
  /** Above the gas at that service's nozzle; null without a gas temperature. */
  gasDeltaK: number | null;
  status: Exclude<Status, 'trip'>;
  suspect: 'suction-valve' | 'discharge-valve' | null;
  message: string;
}

export interface ValveCoverAssessment {
  covers: ValveCoverFinding[];
  status: Exclude<Status, 'trip'>;
  message: string;
}

const kelvins = (value: number) => `${value >= 0 ? '+' : ''}${value.toFixed(1)} K`;

function checkCover(cover: ValveCoverReading, index: number): void {
  if (typeof cover.id !== 'string' || cover.id.length === 0) {
    throw new CalcError(
      'E_GEOMETRY',
      `covers[${index}].id`,
      cover.id,
      'Every valve cover needs its position id, e.g. C1-HE-S1.',
    );
  }
  if (cover.end !== 'head' && cover.end !== 'crank') {
    throw new CalcError(
      'E_GEOMETRY',
      `covers[${index}].end`,
      cover.end,
      `end = "${String(cover.end)}"; use head or crank.`,
    );
  }
  if (cover.service !== 'suction' && cover.service !== 'discharge') {
    throw new CalcError(
      'E_GEOMETRY',
      `covers[${index}].service`,
      cover.service,
      `service = "${String(cover.service)}"; use suction or discharge.`,
    );
  }
  requireRange('E_TEMP_RANGE', `covers[${index}].temperatureK`, cover.temperatureK, {
    min: COVER_TEMPERATURE_MIN_K,
    max: COVER_TEMPERATURE_MAX_K,
    unit: 'K',
  });
}

/** Compares each cover with its peers and with the gas, and names the likely leaking valve. */
export function assessValveCovers(i: ValveCoverInput): ValveCoverAssessment {
  if (!Array.isArray(i.covers) || i.covers.length === 0) {
    throw new CalcError('E_GEOMETRY', 'covers', i.covers, 'Give the valve cover readings of one cylinder.');
  }
  i.covers.forEach(checkCover);
  const gas = {
    suction:
      i.suctionGasK === undefined
        ? undefined
        : requireRange('E_TEMP_RANGE', 'suctionGasK', i.suctionGasK, {
            min: COVER_TEMPERATURE_MIN_K,
            max: COVER_TEMPERATURE_MAX_K,
            unit: 'K',
          }),
    discharge:
      i.dischargeGasK === undefined
        ? undefined
        : requireRange('E_TEMP_RANGE', 'dischargeGasK', i.dischargeGasK, {
            min: COVER_TEMPERATURE_MIN_K,
            max: COVER_TEMPERATURE_MAX_K,
            unit: 'K',
          }),
  };
  const t = { ...VALVE_COVER_THRESHOLDS, ...i.thresholds };

  const findings = i.covers.map((cover, index): ValveCoverFinding => {
    const peers = i.covers.filter((other, otherIndex) => otherIndex !== index && other.service === cover.service);
    const peerDeltaK = peers.length ? cover.temperatureK - median(peers.map((peer) => peer.temperatureK)) : null;
    const gasK = gas[cover.service];
    const gasDeltaK = gasK === undefined ? null : cover.temperatureK - gasK;

    let status: Exclude<Status, 'trip'> = 'ok';
    const seen: string[] = [];
    if (peerDeltaK !== null) {
      if (peerDeltaK >= t.peerAlarmK) status = 'alarm';
      else if (peerDeltaK >= t.peerWatchK) status = worstStatus(status, 'watch') as typeof status;
      if (peerDeltaK >= t.peerWatchK) seen.push(`${kelvins(peerDeltaK)} against the other ${cover.service} covers`);
    }
    if (gasDeltaK !== null) {
      const [watch, alarm, strict] =
        cover.service === 'discharge'
          ? [t.dischargeAboveGasWatchK, t.dischargeAboveGasAlarmK, true]
          : [t.suctionAboveGasWatchK, t.suctionAboveGasAlarmK, false];
      const overWatch = strict ? gasDeltaK > watch : gasDeltaK >= watch;
      if (gasDeltaK >= alarm) status = 'alarm';
      else if (overWatch) status = worstStatus(status, 'watch') as typeof status;
      if (overWatch || gasDeltaK >= alarm) seen.push(`${kelvins(gasDeltaK)} against the ${cover.service} gas`);
    }

    const endName = cover.end === 'head' ? 'head-end' : 'crank-end';
    let message: string;
    let suspect: ValveCoverFinding['suspect'] = null;
    if (status === 'ok') {
      message = `${cover.id} normal${peerDeltaK === null ? '' : ` (${kelvins(peerDeltaK)} against its peers)`}.`;
    } else if (cover.service === 'suction') {
      suspect = 'suction-valve';
      message = `${cover.id} runs hot (${seen.join(', ')}): leaking ${endName} suction valve suspected, or its unloader held open. That end's discharge temperature rises and its capacity falls.`;
    } else {
      suspect = 'discharge-valve';
      message = `${cover.id} runs hot (${seen.join(', ')}): leaking ${endName} discharge valve suspected. That end's discharge temperature rises, often more than for a suction valve.`;
    }
    return { id: cover.id, peerDeltaK, gasDeltaK, status, suspect, message };
  });

  const status = findings.reduce<Exclude<Status, 'trip'>>(
    (worst, f) => worstStatus(worst, f.status) as typeof worst,
    'ok',
  );
  const ranked = [...findings].sort(
    (a, b) =>
      ['ok', 'watch', 'alarm'].indexOf(b.status) - ['ok', 'watch', 'alarm'].indexOf(a.status) ||
      (b.peerDeltaK ?? 0) - (a.peerDeltaK ?? 0),
  );
  const worst = ranked[0] as ValveCoverFinding;
  const others = ranked.filter((f) => f !== worst && f.status !== 'ok').map((f) => f.id);
  const message =
    status === 'ok'
      ? 'Valve covers even: no single hot cover. If discharge runs hot on both ends anyway, suspect piston ring leakage.'
      : `${worst.message}${others.length ? ` Also check ${others.join(', ')} after the first is dealt with.` : ''}`;
  return { covers: findings, status, message };
}
