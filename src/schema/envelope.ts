/**
 * The sync envelope: how every record travels between a tablet and the site server, and how it is kept in the
 * tablet's outbox. The envelope id is the record's own id, so a record is stored once however often it is sent.
 */
import { z } from 'zod';
import { ConfigId, describeIssues, Id, IsoTime } from './common';
import {
  BearingClearanceRecord,
  Finding,
  LockoutAck,
  Note,
  Reading,
  Review,
  RodDropRecord,
  Round,
  ValveChange,
} from './records';

/** A finished round travels as one record: the round, every reading and the findings the device computed. */
export const FinishedRound = z
  .strictObject({
    round: Round,
    readings: z.array(Reading).max(2000),
    findings: z.array(Finding).max(5000),
  })
  .superRefine((body, ctx) => {
    if (body.round.state !== 'finished') {
      ctx.addIssue({ code: 'custom', path: ['round', 'state'], message: 'only finished rounds are sent' });
    }
    body.readings.forEach((reading, index) => {
      if (reading.roundId !== body.round.id) {
        ctx.addIssue({ code: 'custom', path: ['readings', index, 'roundId'], message: 'belongs to another round' });
      }
    });
    body.findings.forEach((finding, index) => {
      if (finding.roundId !== body.round.id) {
        ctx.addIssue({ code: 'custom', path: ['findings', index, 'roundId'], message: 'belongs to another round' });
      }
    });
  });
export type FinishedRound = z.infer<typeof FinishedRound>;

/** Each record type with its body schema and current schema version. */
export const RECORD_TYPES = {
  round: { schema: 1, body: FinishedRound, idOf: (body: FinishedRound) => body.round.id },
  valveChange: { schema: 1, body: ValveChange, idOf: (body: ValveChange) => body.id },
  bearingClearance: { schema: 1, body: BearingClearanceRecord, idOf: (body: BearingClearanceRecord) => body.id },
  rodDrop: { schema: 1, body: RodDropRecord, idOf: (body: RodDropRecord) => body.id },
  lockoutAck: { schema: 1, body: LockoutAck, idOf: (body: LockoutAck) => body.id },
  review: { schema: 1, body: Review, idOf: (body: Review) => body.id },
  note: { schema: 1, body: Note, idOf: (body: Note) => body.id },
} as const;
export type RecordType = keyof typeof RECORD_TYPES;
export const RecordTypeSchema = z.enum(Object.keys(RECORD_TYPES) as [RecordType, ...RecordType[]]);

export interface RecordBodies {
  round: FinishedRound;
  valveChange: ValveChange;
  bearingClearance: BearingClearanceRecord;
  rodDrop: RodDropRecord;
  lockoutAck: LockoutAck;
  review: Review;
  note: Note;
}

export const Envelope = z.strictObject({
  id: Id,
  type: RecordTypeSchema,
  schema: z.int().min(1).max(1000),
  /** The person who made the record (a user id); the server checks it against the signed-in user. */
  author: ConfigId,
  device: ConfigId,
  createdAt: IsoTime,
  body: z.unknown(),
});
export type Envelope = z.infer<typeof Envelope>;

export type TypedEnvelope<T extends RecordType = RecordType> = Omit<Envelope, 'type' | 'body'> & {
  type: T;
  body: RecordBodies[T];
};

export class RecordError extends Error {
  override readonly name = 'RecordError';
  constructor(
    message: string,
    readonly issues: string,
  ) {
    super(message);
  }
}

/**
 * Validates an envelope and its body against the schema of its type. Throws RecordError with every field that is
 * wrong; returns the typed envelope otherwise.
 */
export function parseEnvelope(input: unknown): TypedEnvelope {
  const envelope = Envelope.safeParse(input);
  if (!envelope.success) {
    const issues = describeIssues(envelope.error);
    throw new RecordError(`The record envelope is not valid: ${issues}`, issues);
  }
  const spec = RECORD_TYPES[envelope.data.type];
  if (envelope.data.schema !== spec.schema) {
    const issues = `schema: version ${envelope.data.schema} of ${envelope.data.type} is not known here (this version reads ${spec.schema})`;
    throw new RecordError(`The record cannot be read: ${issues}`, issues);
  }
  const body = spec.body.safeParse(envelope.data.body);
  if (!body.success) {
    const issues = describeIssues(body.error)
      .split('; ')
      .map((line) => `body.${line}`)
      .join('; ');
    throw new RecordError(`The ${envelope.data.type} record is not valid: ${issues}`, issues);
  }
  const bodyId = (spec.idOf as (b: unknown) => string)(body.data);
  if (bodyId !== envelope.data.id) {
    const issues = `id: the envelope id ${envelope.data.id} differs from the record's own id ${bodyId}`;
    throw new RecordError(`The record is not valid: ${issues}`, issues);
  }
  return { ...envelope.data, body: body.data } as TypedEnvelope;
}

/** Wraps a record in its envelope. */
export function envelopeFor<T extends RecordType>(
  type: T,
  body: RecordBodies[T],
  meta: { author: string; device: string; createdAt: string },
): TypedEnvelope<T> {
  const spec = RECORD_TYPES[type];
  return {
    id: (spec.idOf as (b: unknown) => string)(body),
    type,
    schema: spec.schema,
    author: meta.author,
    device: meta.device,
    createdAt: meta.createdAt,
    body,
  };
}
