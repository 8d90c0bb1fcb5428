import { requireRange } from './errors';

/** Layer constants of the U.S. Standard Atmosphere 1976, troposphere (identical to ISO 2533 there). */
const P0_PA = 101_325;
const T0_K = 288.15;
const LAPSE_RATE_K_PER_M = 0.0065;
const G0_M_PER_S2 = 9.80665;
const AIR_MOLAR_MASS_KG_PER_MOL = 0.0289644;
/** The 1976 standard's own gas constant, not the 2019 exact value: it reproduces the published tables. */
const R_STAR_USSA76 = 8.31432;
/** Effective Earth radius for geopotential altitude, m. */
const EARTH_RADIUS_M = 6_356_766;

export const ELEVATION_MIN_M = -500;
export const ELEVATION_MAX_M = 5000;

/**
 * Barometric pressure at a site elevation, Pa absolute, from the troposphere layer of the
 * U.S. Standard Atmosphere 1976: p = p0·(1 − L·H/T0)^(g0·M/(R*·L)), with H the geopotential altitude
 * H = r0·Z/(r0 + Z) of the geometric elevation Z.
 * source: U.S. Standard Atmosphere, 1976 (NOAA/NASA/USAF), equations 18, 33a and table I.
 * Valid for −500 m to 5000 m (the tool's range; the layer itself reaches 11 km geopotential).
 * A measured local barometer reading, where the site has one, is better: weather moves it by a few kPa.
 */
export function barometricPressure(elevationM: number): number {
  requireRange('E_ELEVATION_RANGE', 'elevationM', elevationM, {
    min: ELEVATION_MIN_M,
    max: ELEVATION_MAX_M,
    unit: 'm',
  });
  const geopotentialM = (EARTH_RADIUS_M * elevationM) / (EARTH_RADIUS_M + elevationM);
  const exponent = (G0_M_PER_S2 * AIR_MOLAR_MASS_KG_PER_MOL) / (R_STAR_USSA76 * LAPSE_RATE_K_PER_M);
  return P0_PA * (1 - (LAPSE_RATE_K_PER_M * geopotentialM) / T0_K) ** exponent;
}
