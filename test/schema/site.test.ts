import { describe, expect, expectTypeOf, it } from 'vitest';
import { toSI } from '../../src/calc';
import { demoConfig } from '../../src/demo';
import { describeIssues, SiteConfig } from '../../src/schema';

const base = () => structuredClone(demoConfig()) as Record<string, unknown> & ReturnType<typeof demoConfig>;

function issues(input: unknown): string {
  const result = SiteConfig.safeParse(input);
  expect(result.success).toBe(false);
  return result.success ? '' : describeIssues(result.error);
}

describe('SiteConfig', () => {
  it('should accept the demo site and fill defaults', () => {
    const config = demoConfig();
    expect(config.machines.map((m) => m.id)).toEqual(['K-101', 'K-102', 'K-301']);
    expect(config.routes.map((r) => r.id)).toEqual(['morning', 'night']);
    expect(config.routes[0]?.points.find((p) => p.id === 'K-101-NOTE')?.role).toBe('other');
  });

  it('should refuse unknown fields and name where they are', () => {
    const config = base();
    (config.machines[0] as Record<string, unknown>).colour = 'green';
    expect(issues(config)).toMatch(/^machines\.0: .*colour/);
  });

  it('should refuse physically impossible values with the allowed range', () => {
    const config = base();
    (config.machines[0] as { frame: { strokeM: number } }).frame.strokeM = 5;
    expect(issues(config)).toMatch(/^machines\.0\.frame\.strokeM: must be above 0 and at most 2 m(;|$)/);
  });

  it('should refuse over-long names', () => {
    const config = base();
    (config as { name: string }).name = 'x'.repeat(201);
    expect(issues(config)).toBe('name: must be at most 200 characters');
  });

  it('should refuse limits out of order', () => {
    const config = base();
    const point = config.routes[0]?.points[0] as { limits: Record<string, number> };
    point.limits = { highWatch: 10, highAlarm: 5 };
    expect(issues(config)).toMatch(/routes\.0\.points\.0\.limits\.highAlarm: must not be below highWatch/);
  });

  it('should refuse references to things that do not exist', () => {
    const config = base();
    (config.machines[0]?.cylinders[0] as { stageId: string }).stageId = 'S9';
    (config.routes[0]?.points[0] as { machineId: string }).machineId = 'K-999';
    const text = issues(config);
    expect(text).toMatch(/machines\.0\.cylinders\.0\.stageId: no stage S9/);
    expect(text).toMatch(/routes\.0\.points\.0\.machineId: no machine K-999/);
  });

  it('should refuse a pressure point read in a temperature unit', () => {
    const config = base();
    (config.routes[0]?.points[0] as { unit: string }).unit = 'degC';
    expect(issues(config)).toMatch(
      /routes\.0\.points\.0\.unit: degC is a temperature unit; a pressure point needs a pressure unit/,
    );
  });

  it('should refuse a gas analysis that does not add up, with the calculation room’s message', () => {
    const config = base();
    (config.gasStreams[0] as { composition: Record<string, number> }).composition = { methane: 0.8, ethane: 0.1 };
    expect(issues(config)).toMatch(/gasStreams\.0\.composition: The mole fractions add up to 0\.9/);
  });

  it('should refuse one point defined two ways on two routes', () => {
    const config = base();
    const night = config.routes[1]?.points[0] as { label: string; id: string };
    night.label = 'Something else';
    expect(issues(config)).toMatch(
      new RegExp(`routes\\.1\\.points\\.0\\.id: check point ${night.id} is defined differently`),
    );
  });

  it('should keep limits in SI: the demo stage-1 suction alarm is 1.5 barg at 900 m', () => {
    // source: U.S. Standard Atmosphere 1976 at 900 m ≈ 90.8 kPa (the demo rounds its barometer to that for limits)
    const point = demoConfig().routes[0]?.points.find((p) => p.id === 'K-101-S1-PS');
    expect(point?.limits?.lowAlarm).toBeCloseTo(toSI(1.5, 'barg', { barometricPa: 90_800 }), 6);
  });

  it('should infer exact types from the schema', () => {
    expectTypeOf<SiteConfig['barometer']>().toEqualTypeOf<
      { kind: 'elevation'; elevationM: number } | { kind: 'fixed'; pressurePa: number }
    >();
    expectTypeOf<SiteConfig['machines'][number]['bearings'][number]['kind']>().toEqualTypeOf<
      'main' | 'crankpin' | 'crossheadPin'
    >();
  });
});
