/**
 * The backup file a tablet exports and imports: every configuration, round (with its readings and findings),
 * maintenance record and unsent outbox entry on the device, as one JSON document. Each part reuses its record
 * schema, and the whole file is checked before anything is written.
 */
import { z } from 'zod';
import { ConfigId, Id, IsoTime } from './common';
import { Envelope, RECORD_TYPES, RecordTypeSchema } from './envelope';
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
import { SiteConfig } from './site';

export const BACKUP_FORMAT = 'crankhouse-backup';
export const BACKUP_FORMAT_VERSION = 1;

/** A round as it is kept on the tablet: a draft with the readings so far, or a finished round with its findings. */
export const BackupRound = z
  .strictObject({
    round: Round,
    readings: z.array(Reading).max(2000),
    findings: z.array(Finding).max(5000),
  })
  .superRefine((item, ctx) => {
    item.readings.forEach((reading, index) => {
      if (reading.roundId !== item.round.id) {
        ctx.addIssue({ code: 'custom', path: ['readings', index, 'roundId'], message: 'belongs to another round' });
      }
    });
    item.findings.forEach((finding, index) => {
      if (finding.roundId !== item.round.id) {
        ctx.addIssue({ code: 'custom', path: ['findings', index, 'roundId'], message: 'belongs to another round' });
      }
    });
    if (item.round.state === 'draft' && item.findings.length > 0) {
      ctx.addIssue({ code: 'custom', path: ['findings'], message: 'a draft round has no findings yet' });
    }
  });
export type BackupRound = z.infer<typeof BackupRound>;

const RECORD_TYPE_NAMES = ['valveChange', 'bearingClearance', 'rodDrop', 'lockoutAck', 'review', 'note'] as const;

export const BackupRecord = z.discriminatedUnion(
  'type',
  [
    z.strictObject({ type: z.literal('valveChange'), body: ValveChange }),
    z.strictObject({ type: z.literal('bearingClearance'), body: BearingClearanceRecord }),
    z.strictObject({ type: z.literal('rodDrop'), body: RodDropRecord }),
    z.strictObject({ type: z.literal('lockoutAck'), body: LockoutAck }),
    z.strictObject({ type: z.literal('review'), body: Review }),
    z.strictObject({ type: z.literal('note'), body: Note }),
  ],
  { error: `must be one of ${RECORD_TYPE_NAMES.join(', ')}` },
);
export type BackupRecord = z.infer<typeof BackupRecord>;

/** An unsent record as it waits in the outbox; its envelope is checked against the schema of its type. */
export const BackupOutboxEntry = z
  .strictObject({
    seq: z.int().min(1),
    id: Id,
    type: RecordTypeSchema,
    envelope: Envelope,
    state: z.enum(['pending', 'attention']),
    attempts: z.int().min(0).max(1_000_000),
    lastError: z.string().max(2000).optional(),
    enqueuedAt: IsoTime,
  })
  .superRefine((entry, ctx) => {
    if (entry.envelope.id !== entry.id) {
      ctx.addIssue({ code: 'custom', path: ['envelope', 'id'], message: `differs from the entry id ${entry.id}` });
    }
    if (entry.envelope.type !== entry.type) {
      ctx.addIssue({
        code: 'custom',
        path: ['envelope', 'type'],
        message: `differs from the entry type ${entry.type}`,
      });
    }
    const spec = RECORD_TYPES[entry.envelope.type];
    if (entry.envelope.schema !== spec.schema) {
      ctx.addIssue({
        code: 'custom',
        path: ['envelope', 'schema'],
        message: `version ${entry.envelope.schema} of ${entry.envelope.type} is not known here (this version reads ${spec.schema})`,
      });
    }
    const body = spec.body.safeParse(entry.envelope.body);
    if (!body.success) {
      for (const issue of body.error.issues) {
        ctx.addIssue({ code: 'custom', path: ['envelope', 'body', ...issue.path], message: issue.message });
      }
    } else if ((spec.idOf as (b: unknown) => string)(body.data) !== entry.id) {
      ctx.addIssue({ code: 'custom', path: ['envelope', 'body'], message: `is not the record ${entry.id}` });
    }
  });
export type BackupOutboxEntry = z.infer<typeof BackupOutboxEntry>;

function flagRepeats<T>(
  items: T[],
  keyOf: (item: T) => string | number,
  pathOf: (index: number) => Array<string | number>,
  what: string,
  ctx: z.RefinementCtx,
): Set<string | number> {
  const seen = new Set<string | number>();
  items.forEach((item, index) => {
    const key = keyOf(item);
    if (seen.has(key)) ctx.addIssue({ code: 'custom', path: pathOf(index), message: `${what} ${key} appears twice` });
    seen.add(key);
  });
  return seen;
}

export const Backup = z
  .strictObject({
    format: z.literal(BACKUP_FORMAT, { error: `must be "${BACKUP_FORMAT}"` }),
    formatVersion: z.literal(BACKUP_FORMAT_VERSION, {
      error: `must be ${BACKUP_FORMAT_VERSION} (this version of the app reads backup format ${BACKUP_FORMAT_VERSION})`,
    }),
    exportedAt: IsoTime,
    deviceId: ConfigId,
    configs: z.array(SiteConfig),
    rounds: z.array(BackupRound),
    records: z.array(BackupRecord),
    outbox: z.array(BackupOutboxEntry),
  })
  .superRefine((file, ctx) => {
    flagRepeats(
      file.configs,
      (c) => c.version,
      (i) => ['configs', i, 'version'],
      'configuration version',
      ctx,
    );
    const roundIds = flagRepeats(
      file.rounds,
      (r) => r.round.id,
      (i) => ['rounds', i, 'round', 'id'],
      'round',
      ctx,
    );
    const readingIds = new Set<string>();
    const findingKeys = new Set<string>();
    file.rounds.forEach((item, r) => {
      item.readings.forEach((reading, i) => {
        if (readingIds.has(reading.id)) {
          ctx.addIssue({
            code: 'custom',
            path: ['rounds', r, 'readings', i, 'id'],
            message: `reading ${reading.id} appears twice`,
          });
        }
        readingIds.add(reading.id);
      });
      item.findings.forEach((finding, i) => {
        if (findingKeys.has(finding.key)) {
          ctx.addIssue({
            code: 'custom',
            path: ['rounds', r, 'findings', i, 'key'],
            message: `finding ${finding.key} appears twice`,
          });
        }
        findingKeys.add(finding.key);
      });
    });
    const recordIds = flagRepeats(
      file.records,
      (r) => r.body.id,
      (i) => ['records', i, 'body', 'id'],
      'record',
      ctx,
    );
    flagRepeats(
      file.outbox,
      (e) => e.id,
      (i) => ['outbox', i, 'id'],
      'outbox entry for',
      ctx,
    );
    flagRepeats(
      file.outbox,
      (e) => e.seq,
      (i) => ['outbox', i, 'seq'],
      'outbox position',
      ctx,
    );
    const finished = new Set(file.rounds.filter((r) => r.round.state === 'finished').map((r) => r.round.id));
    file.outbox.forEach((entry, index) => {
      const known =
        entry.type === 'round' ? finished.has(entry.id) : recordIds.has(entry.id) && !roundIds.has(entry.id);
      if (!known) {
        ctx.addIssue({
          code: 'custom',
          path: ['outbox', index, 'id'],
          message:
            entry.type === 'round'
              ? `no finished round ${entry.id} in this file`
              : `no ${entry.type} record ${entry.id} in this file`,
        });
      }
    });
  });
export type Backup = z.infer<typeof Backup>;
