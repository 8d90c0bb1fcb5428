/**
 * The site configuration: what a site has and what is read on each route. Versioned: every round records the
 * version it used, and a new version is a new record. Physical values are SI (Pa absolute, K, m, kg, N).
 */
import { z } from 'zod';
import { CalcError, COMPONENTS, gasProperties, type Quantity, STANDARD_STATES, unitInfo } from '../calc';
import {
  bounded,
  ConfigId,
  Fraction,
  IsoTime,
  LengthM,
  LongText,
  Name,
  positive,
  ShortText,
  TemperatureK,
  UnitId,
} from './common';

export const Barometer = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('elevation'), elevationM: bounded(-500, 5000, 'm') }),
  z.strictObject({ kind: z.literal('fixed'), pressurePa: bounded(40_000, 110_000, 'Pa') }),
]);

/** Quantities a person reads or sees, with the unit each is shown in. */
export const DISPLAY_QUANTITIES = [
  'pressure',
  'temperature',
  'length',
  'power',
  'volumeFlow',
] as const satisfies readonly Quantity[];

export const UnitPreferences = z.strictObject({
  system: z.enum(['SI', 'US']),
  overrides: z.partialRecord(z.enum(DISPLAY_QUANTITIES), UnitId).default({}),
});

const Composition = z
  .partialRecord(z.enum(COMPONENTS, { error: `must be one of ${COMPONENTS.join(', ')}` }), Fraction)
  .superRefine((composition, ctx) => {
    try {
      gasProperties(composition, 300);
    } catch (error) {
      if (error instanceof CalcError) ctx.addIssue({ code: 'custom', message: error.message });
      else throw error;
    }
  });

export const GasStream = z.strictObject({
  id: ConfigId,
  name: Name,
  composition: Composition,
  standardBasis: z.enum(Object.keys(STANDARD_STATES) as ['Sm3-15C', 'Nm3-0C', 'SCF-60F']).default('Sm3-15C'),
});

export const ReversalCriterionSchema = z.strictObject({
  minDegrees: bounded(0, 180, '°'),
  minFraction: bounded(0, 1),
});

export const Frame = z.strictObject({
  strokeM: positive(2, 'm'),
  connectingRodM: positive(20, 'm'),
  ratedSpeedRpm: positive(3000, 'rpm'),
  ratedCompressionN: positive(1e8, 'N'),
  ratedTensionN: positive(1e8, 'N'),
  /** Piston, rod, nut and crosshead per throw, kg. */
  throws: z
    .array(z.strictObject({ index: z.int().min(1).max(16), reciprocatingMassKg: bounded(0, 1e5, 'kg') }))
    .min(1, 'a frame has at least one throw')
    .max(16),
  reversalCriterion: ReversalCriterionSchema.optional(),
});

export const Stage = z.strictObject({
  id: ConfigId,
  index: z.int().min(1).max(10),
  gasStreamId: ConfigId,
  veMethod: z.enum(['theoretical', 'empirical']).default('empirical'),
  veConstant: bounded(50, 110).optional(),
  compressionEfficiency: bounded(0.5, 1).optional(),
  mechanicalEfficiency: bounded(0.5, 1).optional(),
  /** Discharge temperature trip setting or rated limit, K. */
  dischargeTemperatureLimitK: TemperatureK.optional(),
});

export const RodDropSetup = z.strictObject({
  riderToPinM: LengthM,
  probeToPinM: LengthM,
  allowableWearM: positive(0.05, 'm'),
  /** Rod-drop reading with new rider bands, m. */
  newBandReadingM: bounded(-0.05, 0.05, 'm'),
});

export const Cylinder = z.strictObject({
  id: ConfigId,
  stageId: ConfigId,
  throw: z.int().min(1).max(16),
  boreM: positive(3, 'm'),
  rodM: positive(1, 'm'),
  tailRodM: positive(1, 'm').optional(),
  headClearance: bounded(0, 2),
  crankClearance: bounded(0, 2),
  headActive: z.boolean(),
  crankActive: z.boolean(),
  polytropicExponent: bounded(1.01, 1.7).optional(),
  zSuction: bounded(0.06, 1.5).optional(),
  zDischarge: bounded(0.06, 1.5).optional(),
  rodDrop: RodDropSetup.optional(),
});

export const ValvePosition = z.strictObject({
  /** e.g. `C1-HE-S1`. */
  id: ConfigId,
  cylinderId: ConfigId,
  end: z.enum(['head', 'crank']),
  service: z.enum(['suction', 'discharge']),
  index: z.int().min(1).max(12),
});

export const BearingLimitsSchema = z.strictObject({
  alarmK: TemperatureK.optional(),
  tripK: TemperatureK.optional(),
  riseOverOilWatchK: positive(200, 'K').optional(),
  riseOverOilAlarmK: positive(200, 'K').optional(),
  roundRiseWatchK: positive(200, 'K').optional(),
  roundRiseAlarmK: positive(200, 'K').optional(),
  rateWatchKPerH: positive(200, 'K/h').optional(),
  rateAlarmKPerH: positive(200, 'K/h').optional(),
  peerWatchK: positive(200, 'K').optional(),
  peerAlarmK: positive(200, 'K').optional(),
});

export const BearingKind = z.enum(['main', 'crankpin', 'crossheadPin']);

export const Bearing = z.strictObject({
  id: ConfigId,
  kind: BearingKind,
  index: z.int().min(1).max(20),
  journalDiameterM: positive(3, 'm').optional(),
  clearance: z
    .strictObject({
      specMinM: positive(0.1, 'm'),
      specMaxM: positive(0.1, 'm'),
      wearLimitM: positive(0.1, 'm').optional(),
    })
    .refine((c) => c.specMinM <= c.specMaxM, 'specMinM must not exceed specMaxM')
    .refine((c) => c.wearLimitM === undefined || c.wearLimitM >= c.specMaxM, 'wearLimitM must be at least specMaxM')
    .optional(),
  limits: BearingLimitsSchema.default({}),
});

export const LubeOilPoint = z.strictObject({ id: ConfigId, name: Name });

export const Machine = z.strictObject({
  id: ConfigId,
  name: Name,
  service: ShortText.default(''),
  frame: Frame,
  stages: z.array(Stage).min(1).max(10),
  cylinders: z.array(Cylinder).min(1).max(32),
  valvePositions: z.array(ValvePosition).max(256).default([]),
  bearings: z.array(Bearing).max(64).default([]),
  lubeOilPoints: z.array(LubeOilPoint).max(32).default([]),
});

export const POINT_KINDS = [
  'pressure',
  'temperature',
  'valveCoverTemperature',
  'bearingTemperature',
  'level',
  'vibration',
  'yesNo',
  'choice',
  'text',
] as const;
export const PointKind = z.enum(POINT_KINDS);

/** Which quantity (and so which units) each numeric kind of point is read in. */
export const POINT_QUANTITY: Readonly<
  Partial<Record<(typeof POINT_KINDS)[number], Quantity | 'percent' | 'velocity'>>
> = {
  pressure: 'pressure',
  temperature: 'temperature',
  valveCoverTemperature: 'temperature',
  bearingTemperature: 'temperature',
  level: 'percent',
  vibration: 'velocity',
};

/** What a point's reading means to the engineering checks. */
export const POINT_ROLES = [
  'suctionPressure',
  'dischargePressure',
  'suctionTemperature',
  'dischargeTemperature',
  'valveCover',
  'bearing',
  'oilSupplyTemperature',
  'oilPressure',
  'other',
] as const;

/** Limits in SI (or percent / mm/s for level and vibration); each one optional, in rising order. */
export const Limits = z
  .strictObject({
    lowTrip: z.number().optional(),
    lowAlarm: z.number().optional(),
    lowWatch: z.number().optional(),
    highWatch: z.number().optional(),
    highAlarm: z.number().optional(),
    highTrip: z.number().optional(),
  })
  .superRefine((limits, ctx) => {
    const order = ['lowTrip', 'lowAlarm', 'lowWatch', 'highWatch', 'highAlarm', 'highTrip'] as const;
    let previous: { key: string; value: number } | null = null;
    for (const key of order) {
      const value = limits[key];
      if (value === undefined) continue;
      if (!Number.isFinite(value)) {
        ctx.addIssue({ code: 'custom', path: [key], message: 'must be a finite number' });
        continue;
      }
      if (previous && value < previous.value) {
        ctx.addIssue({ code: 'custom', path: [key], message: `must not be below ${previous.key} (${previous.value})` });
      }
      previous = { key, value };
    }
  });
export type Limits = z.infer<typeof Limits>;

export const CheckPoint = z
  .strictObject({
    id: ConfigId,
    label: Name,
    kind: PointKind,
    role: z.enum(POINT_ROLES).default('other'),
    machineId: ConfigId,
    stageId: ConfigId.optional(),
    cylinderId: ConfigId.optional(),
    valvePositionId: ConfigId.optional(),
    bearingId: ConfigId.optional(),
    lubeOilPointId: ConfigId.optional(),
    /** The unit the gauge shows (numeric kinds of the calculation room's quantities). */
    unit: UnitId.optional(),
    limits: Limits.optional(),
    /** Choice points: the answers offered. */
    choices: z.array(ShortText.min(1)).min(2).max(12).optional(),
    /** Yes/no points: the answer that is normal, and how bad the other one is. */
    expected: z
      .strictObject({ answer: z.enum(['yes', 'no']), otherwise: z.enum(['watch', 'alarm', 'trip']) })
      .optional(),
    /** Opening something for this step needs the lockout cautions first. */
    lockout: z.strictObject({ cautionSetId: ConfigId }).optional(),
    hint: LongText.optional(),
  })
  .superRefine((point, ctx) => {
    const quantity = POINT_QUANTITY[point.kind];
    if ((quantity === 'pressure' || quantity === 'temperature') && point.unit === undefined) {
      ctx.addIssue({ code: 'custom', path: ['unit'], message: `a ${point.kind} point needs the unit its gauge shows` });
    }
    if (point.unit !== undefined && quantity !== undefined && quantity !== 'percent' && quantity !== 'velocity') {
      const unitQuantity = unitInfo(point.unit).quantity;
      if (unitQuantity !== quantity) {
        ctx.addIssue({
          code: 'custom',
          path: ['unit'],
          message: `${point.unit} is a ${unitQuantity} unit; a ${point.kind} point needs a ${quantity} unit`,
        });
      }
    }
    if (point.kind === 'choice' && !point.choices) {
      ctx.addIssue({ code: 'custom', path: ['choices'], message: 'a choice point needs its choices' });
    }
    if (point.kind === 'valveCoverTemperature' && !point.valvePositionId) {
      ctx.addIssue({
        code: 'custom',
        path: ['valvePositionId'],
        message: 'a valve cover point names its valve position',
      });
    }
    if (point.kind === 'bearingTemperature' && !point.bearingId) {
      ctx.addIssue({ code: 'custom', path: ['bearingId'], message: 'a bearing point names its bearing' });
    }
  });
export type CheckPoint = z.infer<typeof CheckPoint>;

export const Route = z.strictObject({
  id: ConfigId,
  name: Name,
  points: z.array(CheckPoint).min(1, 'a route has at least one check point').max(1000),
});

export const CautionSet = z.strictObject({
  id: ConfigId,
  title: Name,
  cautions: z
    .array(z.strictObject({ id: ConfigId, text: LongText.min(1) }))
    .min(1)
    .max(30),
});
export type CautionSet = z.infer<typeof CautionSet>;

const SiteConfigShape = z.strictObject({
  version: z.int().min(1).max(1_000_000),
  name: Name,
  publishedAt: IsoTime,
  barometer: Barometer,
  units: UnitPreferences,
  gasStreams: z.array(GasStream).min(1).max(20),
  machines: z.array(Machine).min(1).max(50),
  routes: z.array(Route).min(1).max(50),
  cautionSets: z.array(CautionSet).max(20).default([]),
});

export const SiteConfig = SiteConfigShape.superRefine((config, ctx) => checkReferences(config, ctx));
export type SiteConfig = z.infer<typeof SiteConfig>;
export type Machine = z.infer<typeof Machine>;
export type Stage = z.infer<typeof Stage>;
export type Cylinder = z.infer<typeof Cylinder>;
export type Bearing = z.infer<typeof Bearing>;
export type ValvePosition = z.infer<typeof ValvePosition>;
export type GasStream = z.infer<typeof GasStream>;
export type Route = z.infer<typeof Route>;

function unique(ids: string[], path: Array<string | number>, what: string, ctx: z.RefinementCtx): Set<string> {
  const seen = new Set<string>();
  ids.forEach((id, index) => {
    if (seen.has(id))
      ctx.addIssue({ code: 'custom', path: [...path, index, 'id'], message: `${what} id ${id} is used twice` });
    seen.add(id);
  });
  return seen;
}

/** Every id a configuration refers to must exist, and ids must be unique where they are looked up. */
function checkReferences(c: z.infer<typeof SiteConfigShape>, ctx: z.RefinementCtx): void {
  const gas = unique(
    c.gasStreams.map((g) => g.id),
    ['gasStreams'],
    'gas stream',
    ctx,
  );
  const cautions = unique(
    c.cautionSets.map((s) => s.id),
    ['cautionSets'],
    'caution set',
    ctx,
  );
  unique(
    c.machines.map((m) => m.id),
    ['machines'],
    'machine',
    ctx,
  );
  const byMachine = new Map(c.machines.map((m) => [m.id, m]));
  c.machines.forEach((machine, m) => {
    const stages = unique(
      machine.stages.map((s) => s.id),
      ['machines', m, 'stages'],
      'stage',
      ctx,
    );
    const cylinders = unique(
      machine.cylinders.map((s) => s.id),
      ['machines', m, 'cylinders'],
      'cylinder',
      ctx,
    );
    unique(
      machine.valvePositions.map((s) => s.id),
      ['machines', m, 'valvePositions'],
      'valve position',
      ctx,
    );
    unique(
      machine.bearings.map((s) => s.id),
      ['machines', m, 'bearings'],
      'bearing',
      ctx,
    );
    const throws = new Set(machine.frame.throws.map((t) => t.index));
    machine.stages.forEach((stage, s) => {
      if (!gas.has(stage.gasStreamId)) {
        ctx.addIssue({
          code: 'custom',
          path: ['machines', m, 'stages', s, 'gasStreamId'],
          message: `no gas stream ${stage.gasStreamId}`,
        });
      }
    });
    machine.cylinders.forEach((cylinder, k) => {
      const path = ['machines', m, 'cylinders', k];
      if (!stages.has(cylinder.stageId))
        ctx.addIssue({ code: 'custom', path: [...path, 'stageId'], message: `no stage ${cylinder.stageId}` });
      if (!throws.has(cylinder.throw))
        ctx.addIssue({ code: 'custom', path: [...path, 'throw'], message: `the frame has no throw ${cylinder.throw}` });
      if (cylinder.rodM >= cylinder.boreM)
        ctx.addIssue({ code: 'custom', path: [...path, 'rodM'], message: 'the rod must be thinner than the bore' });
      if (machine.frame.connectingRodM <= machine.frame.strokeM / 2) {
        ctx.addIssue({
          code: 'custom',
          path: ['machines', m, 'frame', 'connectingRodM'],
          message: 'the connecting rod must be longer than the crank radius',
        });
      }
    });
    machine.valvePositions.forEach((position, v) => {
      if (!cylinders.has(position.cylinderId)) {
        ctx.addIssue({
          code: 'custom',
          path: ['machines', m, 'valvePositions', v, 'cylinderId'],
          message: `no cylinder ${position.cylinderId}`,
        });
      }
    });
  });
  const pointsById = new Map<string, string>();
  c.routes.forEach((route, r) => {
    unique(
      route.points.map((p) => p.id),
      ['routes', r, 'points'],
      'check point',
      ctx,
    );
    // A point may sit on several routes (morning and night rounds), but it is one physical point.
    route.points.forEach((point, p) => {
      const definition = JSON.stringify(point);
      const earlier = pointsById.get(point.id);
      if (earlier !== undefined && earlier !== definition) {
        ctx.addIssue({
          code: 'custom',
          path: ['routes', r, 'points', p, 'id'],
          message: `check point ${point.id} is defined differently on another route`,
        });
      }
      pointsById.set(point.id, definition);
    });
    route.points.forEach((point, p) => {
      const path = ['routes', r, 'points', p];
      const machine = byMachine.get(point.machineId);
      if (!machine) {
        ctx.addIssue({ code: 'custom', path: [...path, 'machineId'], message: `no machine ${point.machineId}` });
        return;
      }
      const refs: Array<[keyof typeof point, Array<{ id: string }>, string]> = [
        ['stageId', machine.stages, 'stage'],
        ['cylinderId', machine.cylinders, 'cylinder'],
        ['valvePositionId', machine.valvePositions, 'valve position'],
        ['bearingId', machine.bearings, 'bearing'],
        ['lubeOilPointId', machine.lubeOilPoints, 'lube oil point'],
      ];
      for (const [field, list, what] of refs) {
        const id = point[field];
        if (typeof id === 'string' && !list.some((item) => item.id === id)) {
          ctx.addIssue({
            code: 'custom',
            path: [...path, field],
            message: `machine ${machine.id} has no ${what} ${id}`,
          });
        }
      }
      if (point.lockout && !cautions.has(point.lockout.cautionSetId)) {
        ctx.addIssue({
          code: 'custom',
          path: [...path, 'lockout', 'cautionSetId'],
          message: `no caution set ${point.lockout.cautionSetId}`,
        });
      }
    });
  });
}
