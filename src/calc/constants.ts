/** Molar gas constant, J/(mol·K). source: 2019 SI redefinition (CODATA 2018), exact. */
export const R_MOLAR = 8.314462618;

/** Standard atmosphere, Pa. source: definition of the standard atmosphere (ISO 2533; USSA 1976), exact. */
export const STANDARD_ATMOSPHERE_PA = 101_325;

/** 0 °C in kelvin, exact by definition of the Celsius scale. */
export const ZERO_CELSIUS_K = 273.15;

/** Molar mass of dry air, kg/mol. source: U.S. Standard Atmosphere 1976 (28.9644 g/mol). */
export const AIR_MOLAR_MASS_KG_PER_MOL = 0.0289644;

/** Exact unit factors. source: NIST SP 811 (2008), appendix B; international yard and pound agreement (1959). */
export const PA_PER_PSI = 6894.757293168361;
export const PA_PER_BAR = 100_000;
export const PA_PER_KGF_PER_CM2 = 98_066.5;
export const M_PER_IN = 0.0254;
export const M3_PER_FT3 = 0.028316846592;
export const W_PER_HP = 745.6998715822702;
