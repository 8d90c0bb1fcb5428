/** Per check point: its configured limits, or the expected answer of a yes/no point. */
import type { Status } from '../calc';
import type { CheckPoint, Finding, Limits, Reading } from '../schema';
import { display, makeFinding, type RoundContext } from './context';

type Band = { status: Status; side: 'high' | 'low'; key: keyof Limits; word: string };

const BANDS: Band[] = [
  { status: 'trip', side: 'high', key: 'highTrip', word: 'high trip' },
  { status: 'trip', side: 'low', key: 'lowTrip', word: 'low trip' },
  { status: 'alarm', side: 'high', key: 'highAlarm', word: 'high alarm' },
  { status: 'alarm', side: 'low', key: 'lowAlarm', word: 'low alarm' },
  { status: 'watch', side: 'high', key: 'highWatch', word: 'high watch' },
  { status: 'watch', side: 'low', key: 'lowWatch', word: 'low watch' },
];

/** The worst band a value falls in: at or beyond a high limit, at or below a low limit. */
export function judgeLimits(value: number, limits: Limits): { status: Status; band: Band | null } {
  for (const band of BANDS) {
    const limit = limits[band.key];
    if (limit === undefined) continue;
    if (band.side === 'high' ? value >= limit : value <= limit) return { status: band.status, band };
  }
  return { status: 'ok', band: null };
}

export function limitFinding(ctx: RoundContext, point: CheckPoint, reading: Reading): Finding | null {
  const subject = { machineId: point.machineId, pointId: point.id };
  if (reading.valueSI !== null && point.limits) {
    const unit = reading.entered?.unit ?? point.unit;
    const { status, band } = judgeLimits(reading.valueSI, point.limits);
    const shown = display(ctx, reading.valueSI, unit);
    const limit = band ? (point.limits[band.key] as number) : null;
    const message = band
      ? `${point.label}: ${shown} is ${band.side === 'high' ? 'at or above' : 'at or below'} its ${band.word} ${display(ctx, limit as number, unit)}.`
      : `${point.label}: ${shown} is within its limits.`;
    return makeFinding(
      ctx,
      'limits',
      subject,
      status,
      message,
      { valueSI: reading.valueSI, limitSI: limit },
      { limits: point.limits },
    );
  }
  if (point.kind === 'yesNo' && point.expected && reading.entered) {
    const answer = reading.entered.text.trim().toLowerCase();
    const normal = answer === point.expected.answer;
    const severity: Status = normal ? 'ok' : point.expected.otherwise;
    const message = normal
      ? `${point.label}: ${answer}, as expected.`
      : `${point.label}: answered ${answer}; ${point.expected.answer} is normal.`;
    return makeFinding(ctx, 'answer', subject, severity, message, {}, { expected: point.expected.answer, answer });
  }
  return null;
}
