/**
 * The records people make. Each has a client-generated id; once it leaves the device it never changes, and a
 * correction is a new record pointing at the old one.
 */
import { z } from 'zod';
import { unitInfo } from '../calc';
import { bounded, ConfigId, Entered, Id, IsoTime, LongText, PersonRef, positive, Severity, ShortText } from './common';

export const Round = z
  .strictObject({
    id: Id,
    siteName: z.string().max(200),
    routeId: ConfigId,
    configVersion: z.int().min(1),
    by: PersonRef,
    deviceId: ConfigId,
    startedAt: IsoTime,
    finishedAt: IsoTime.nullable(),
    state: z.enum(['draft', 'finished']),
  })
  .superRefine((round, ctx) => {
    if (round.state === 'finished' && round.finishedAt === null) {
      ctx.addIssue({ code: 'custom', path: ['finishedAt'], message: 'a finished round has its finish time' });
    }
    if (round.state === 'draft' && round.finishedAt !== null) {
      ctx.addIssue({ code: 'custom', path: ['finishedAt'], message: 'a draft round has no finish time yet' });
    }
    if (round.finishedAt !== null && Date.parse(round.finishedAt) < Date.parse(round.startedAt)) {
      ctx.addIssue({ code: 'custom', path: ['finishedAt'], message: 'must not be before startedAt' });
    }
  });
export type Round = z.infer<typeof Round>;

/** Physically possible SI values per quantity of the entered unit. */
const SI_RANGE: Record<string, [number, number]> = {
  pressure: [0, 1e9],
  temperature: [0, 5000],
  length: [-50, 50],
  power: [-1e9, 1e9],
  volumeFlow: [-1e6, 1e6],
};

export const Reading = z
  .strictObject({
    id: Id,
    roundId: Id,
    pointId: ConfigId,
    at: IsoTime,
    /** Exactly what was typed or chosen, with the unit shown; null when skipped. */
    entered: Entered.nullable(),
    /** The value in SI (Pa absolute, K, m, …), or percent / mm/s for level and vibration; null for non-numeric. */
    valueSI: z.number().refine(Number.isFinite, 'must be a finite number').nullable(),
    note: LongText.optional(),
    skipped: z.strictObject({ reason: z.string().trim().min(1, 'say why the point was skipped').max(500) }).optional(),
  })
  .superRefine((reading, ctx) => {
    if (reading.skipped && (reading.entered !== null || reading.valueSI !== null)) {
      ctx.addIssue({ code: 'custom', path: ['skipped'], message: 'a skipped reading has no value' });
    }
    if (!reading.skipped && reading.entered === null) {
      ctx.addIssue({
        code: 'custom',
        path: ['entered'],
        message: 'a reading has a value, or is skipped with a reason',
      });
    }
    const unit = reading.entered?.unit;
    if (unit && reading.valueSI !== null) {
      const range = SI_RANGE[unitInfo(unit).quantity];
      if (range && (reading.valueSI <= range[0] || reading.valueSI > range[1])) {
        const quantity = unitInfo(unit).quantity;
        ctx.addIssue({
          code: 'custom',
          path: ['valueSI'],
          message: `${reading.valueSI} is not a possible ${quantity} (${quantity === 'pressure' ? 'absolute pressure above 0 Pa' : quantity === 'temperature' ? 'above 0 K' : `between ${range[0]} and ${range[1]}`})`,
        });
      }
    }
  });
export type Reading = z.infer<typeof Reading>;

export const FINDING_RULES = [
  'limits',
  'answer',
  'dischargeTemperature',
  'stagePerformance',
  'valveCovers',
  'bearingTemperature',
  'rodLoad',
  'trend',
  'input',
] as const;

/** A finding is derived: the server recomputes it with the same code and compares. */
export const Finding = z.strictObject({
  /** Stable key: round, rule and subject; the same finding recomputed has the same key. */
  key: z.string().min(1).max(300),
  roundId: Id,
  rule: z.enum(FINDING_RULES),
  subject: z.strictObject({
    machineId: ConfigId,
    stageId: ConfigId.optional(),
    cylinderId: ConfigId.optional(),
    throw: z.int().min(1).max(16).optional(),
    bearingId: ConfigId.optional(),
    valvePositionId: ConfigId.optional(),
    pointId: ConfigId.optional(),
  }),
  severity: Severity,
  message: z.string().min(1).max(2000),
  numbers: z.record(z.string().max(64), z.number().refine(Number.isFinite).nullable()),
  inputs: z.record(z.string().max(64), z.unknown()),
});
export type Finding = z.infer<typeof Finding>;

/** As-found condition words for valves (our own list; pick one or more). */
export const AS_FOUND_WORDS = [
  'broken plate',
  'broken ring',
  'broken poppet',
  'cracked plate',
  'broken springs',
  'tired springs',
  'worn seat',
  'pitted seat',
  'worn guard',
  'sticking deposits',
  'debris',
  'liquid damage',
  'corrosion',
  'flutter marks',
  'impact damage',
  'wrong lift or springs',
  'assembly or torque error',
  'loose centre bolt',
  'gasket or seat-face leak',
  'unloader damage',
  'overheating',
  'no fault found',
] as const;

export const PARTS = ['plates', 'rings', 'springs', 'seat', 'guard', 'gaskets', 'complete valve'] as const;

const Torque = z.strictObject({
  text: z.string().max(32),
  unit: z.enum(['Nm', 'ftlbf']),
  valueNm: positive(1e5, 'N·m'),
});

/** The longest photo data URL a valve change may carry (about 450 KB of image: well inside one sync batch). */
export const MAX_PHOTO_DATA_URL = 600_000;

export const ValveChange = z.strictObject({
  id: Id,
  machineId: ConfigId,
  valvePositionId: ConfigId,
  at: IsoTime,
  by: PersonRef,
  reason: z.enum(['planned', 'failure']),
  removedValveId: ShortText,
  installedValveId: ShortText.min(1, 'name the valve fitted'),
  asFound: z.array(z.enum(AS_FOUND_WORDS)).max(AS_FOUND_WORDS.length),
  partsFitted: z.array(z.enum(PARTS)).max(PARTS.length),
  capBoltTorque: Torque.optional(),
  runHours: bounded(0, 1e7, 'h').optional(),
  notes: LongText.optional(),
  /** An optional photo of what was found, downscaled on the tablet so that it travels with the record. */
  photo: z
    .strictObject({
      mediaType: z.enum(['image/jpeg', 'image/webp']),
      dataUrl: z
        .string()
        .max(MAX_PHOTO_DATA_URL, 'the photo is too large; take it again (the app shrinks it before saving)')
        .regex(/^data:image\/(jpeg|webp);base64,[A-Za-z0-9+/]+={0,2}$/, 'must be a base64 JPEG or WebP data URL'),
      widthPx: z.int().min(1).max(4096),
      heightPx: z.int().min(1).max(4096),
    })
    .optional(),
  /** The lockout acknowledgement made before the cover was opened. */
  lockoutAckId: Id,
});
export type ValveChange = z.infer<typeof ValveChange>;

export const ClearanceMethod = z.enum(['liftCheck', 'feeler', 'plastigage', 'micrometers']);

export const BearingClearanceRecord = z.strictObject({
  id: Id,
  machineId: ConfigId,
  bearingId: ConfigId,
  at: IsoTime,
  by: PersonRef,
  method: ClearanceMethod,
  measurements: z
    .array(
      z.strictObject({
        where: z.enum(['top', 'left', 'right', 'bottom', 'average']),
        entered: Entered,
        valueM: positive(0.1, 'm'),
      }),
    )
    .min(1)
    .max(8),
  spec: z.strictObject({
    minM: positive(0.1, 'm').optional(),
    maxM: positive(0.1, 'm').optional(),
    wearLimitM: positive(0.1, 'm').optional(),
  }),
  result: z.strictObject({
    status: Severity,
    perDiameter: z.number().refine(Number.isFinite),
    message: z.string().max(2000),
  }),
  notes: LongText.optional(),
  lockoutAckId: Id,
});
export type BearingClearanceRecord = z.infer<typeof BearingClearanceRecord>;

export const RodDropRecord = z.strictObject({
  id: Id,
  machineId: ConfigId,
  cylinderId: ConfigId,
  at: IsoTime,
  by: PersonRef,
  entered: Entered,
  readingM: bounded(-0.05, 0.05, 'm'),
  newBandReadingM: bounded(-0.05, 0.05, 'm'),
  wearM: bounded(-0.1, 0.1, 'm'),
  usedFraction: z.number().refine(Number.isFinite).nullable(),
  notes: LongText.optional(),
});
export type RodDropRecord = z.infer<typeof RodDropRecord>;

export const LockoutAck = z
  .strictObject({
    id: Id,
    task: z.strictObject({
      kind: z.enum(['valveChange', 'bearingClearance', 'rodDrop', 'checkPoint']),
      machineId: ConfigId,
      /** The valve position, bearing, cylinder or check point the work is on. */
      ref: ConfigId.optional(),
      roundId: Id.optional(),
    }),
    cautionSetId: ConfigId,
    configVersion: z.int().min(1),
    by: PersonRef,
    acknowledgements: z
      .array(z.strictObject({ cautionId: ConfigId, at: IsoTime }))
      .min(1)
      .max(30),
    completedAt: IsoTime,
  })
  .superRefine((ack, ctx) => {
    const ids = new Set<string>();
    ack.acknowledgements.forEach((item, index) => {
      if (ids.has(item.cautionId))
        ctx.addIssue({ code: 'custom', path: ['acknowledgements', index, 'cautionId'], message: 'acknowledged twice' });
      ids.add(item.cautionId);
      if (Date.parse(item.at) > Date.parse(ack.completedAt)) {
        ctx.addIssue({ code: 'custom', path: ['acknowledgements', index, 'at'], message: 'is after completedAt' });
      }
    });
  });
export type LockoutAck = z.infer<typeof LockoutAck>;

export const Review = z.strictObject({
  id: Id,
  findingKey: z.string().min(1).max(300),
  roundId: Id,
  by: PersonRef,
  disposition: z.enum(['acknowledged', 'actionRaised', 'monitor', 'falseAlarm']),
  comment: LongText,
  at: IsoTime,
  /** A later review of the same finding points at the one it supersedes. */
  supersedes: Id.optional(),
});
export type Review = z.infer<typeof Review>;

/** A note added to a finished round: the only way to correct or add to it. */
export const Note = z.strictObject({
  id: Id,
  roundId: Id,
  readingId: Id.optional(),
  by: PersonRef,
  at: IsoTime,
  text: LongText.min(1),
});
export type Note = z.infer<typeof Note>;
