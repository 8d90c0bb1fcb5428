/** How computed numbers are shown: in the site's display units, with a few significant figures. */
import { deltaFromSI, fromSI, unitInfo } from '../../calc';

export interface DisplayUnits {
  pressure: string;
  temperature: string;
  power: string;
  volumeFlow: string;
}

const sig = (value: number, digits = 3) => {
  if (value === 0) return '0';
  const magnitude = Math.floor(Math.log10(Math.abs(value)));
  const decimals = Math.max(0, digits - 1 - magnitude);
  return value.toFixed(Math.min(decimals, 3));
};

const TEMPERATURE_KEYS = /^(observed|predicted|temperature|predictedDischarge|oilSupply|previous)K$/;
const DELTA_KEYS = /(excess|peerDelta|gasDelta|riseOverOil|riseSincePrevious)K$/;

export function label(key: string): string {
  const last = key.split('.').at(-1) ?? key;
  const prefix = key.includes('.') ? `${key.split('.')[0]} ` : '';
  const words = last
    .replace(/(K|N|W|M3s|Deg|Pa|KPerH|PerDay)$/, '')
    .replace(/([A-Z])/g, ' $1')
    .toLowerCase()
    .trim();
  return `${prefix}${words}`;
}

/** One number of a finding, readable: `predicted 94.1 °C`, `excess 9.9 K`, `combined compression 145 kN`. */
export function formatNumber(key: string, value: number | null, units: DisplayUnits, barometricPa: number): string {
  if (value === null) return '–';
  const last = key.split('.').at(-1) ?? key;
  try {
    if (TEMPERATURE_KEYS.test(last))
      return `${sig(fromSI(value, units.temperature, { barometricPa }), 4)} ${unitInfo(units.temperature).label}`;
    if (DELTA_KEYS.test(last)) {
      const deltaUnit = units.temperature === 'degF' ? 'degF' : 'K';
      return `${sig(deltaFromSI(value, deltaUnit))} ${deltaUnit === 'degF' ? '°F' : 'K'}`;
    }
    if (last.endsWith('KPerH'))
      return `${sig(units.temperature === 'degF' ? value * 1.8 : value)} ${units.temperature === 'degF' ? '°F' : 'K'}/h`;
    if (last.endsWith('N')) return `${sig(value / 1000, 4)} kN`;
    if (last.endsWith('W')) return `${sig(fromSI(value, units.power), 4)} ${unitInfo(units.power).label}`;
    if (last.endsWith('M3s')) return `${sig(fromSI(value, units.volumeFlow), 4)} ${unitInfo(units.volumeFlow).label}`;
    if (last.endsWith('Deg')) return `${sig(value, 4)}°`;
    if (last.endsWith('Fraction') || last.startsWith('ve')) return `${sig(value * 100)} %`;
    if (last.endsWith('KgS')) return `${sig(value * 3600, 4)} kg/h`;
    if (last.endsWith('Pa') || last.endsWith('SI')) return sig(value, 4);
  } catch {
    // A value outside a unit's range is shown as it is.
  }
  return sig(value, 4);
}
