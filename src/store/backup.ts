/** Backup export and import: one JSON document with everything the tablet holds, merged back by id. */

import type { SiteConfig } from '../schema';
import {
  BACKUP_FORMAT,
  BACKUP_FORMAT_VERSION,
  Backup,
  type BackupOutboxEntry,
  type BackupRecord,
  type BackupRound,
} from '../schema/backup';
import { sameContent } from './canonical';
import type { OutboxEntry, StoredRecord } from './db';
import { StoreError } from './errors';
import { deviceId } from './meta';
import { sortFindings, sortReadings } from './rounds';
import { type Ctx, read, write } from './tx';
import { describe } from './validate';

export type BackupFile = Backup;

export interface ImportResult {
  /** Configurations, rounds and records that were new here. */
  added: number;
  /** Those already here with the same content. */
  skipped: number;
  /** Those already here with different content: left as they are, one line each. */
  conflicts: string[];
}

const byId = (a: { id: string }, b: { id: string }) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

export async function exportBackup(ctx: Ctx): Promise<BackupFile> {
  const device = await deviceId(ctx);
  const exportedAt = new Date().toISOString();
  return read(ctx, ['configs', 'rounds', 'readings', 'findings', 'records', 'outbox'], async (tx) => {
    const configs = await tx.objectStore('configs').getAll();
    const rounds = await tx.objectStore('rounds').getAll();
    const readings = await tx.objectStore('readings').getAll();
    const findings = await tx.objectStore('findings').getAll();
    const records = await tx.objectStore('records').getAll();
    const outbox = await tx.objectStore('outbox').getAll();
    const group = <T extends { roundId: string }>(items: T[]) => {
      const map = new Map<string, T[]>();
      for (const item of items) map.set(item.roundId, [...(map.get(item.roundId) ?? []), item]);
      return map;
    };
    const readingsByRound = group(readings);
    const findingsByRound = group(findings);
    return {
      format: BACKUP_FORMAT,
      formatVersion: BACKUP_FORMAT_VERSION,
      exportedAt,
      deviceId: device,
      configs,
      rounds: rounds
        .sort((a, b) => Date.parse(a.startedAt) - Date.parse(b.startedAt) || byId(a, b))
        .map((round) => ({
          round,
          readings: sortReadings(readingsByRound.get(round.id) ?? []),
          findings: sortFindings(findingsByRound.get(round.id) ?? []),
        })),
      records: records
        .sort((a, b) => (a.type < b.type ? -1 : a.type > b.type ? 1 : byId(a, b)))
        .map(({ type, body }) => ({ type, body }) as BackupRecord),
      outbox: outbox as BackupOutboxEntry[],
    };
  });
}

/** Checks that each outbox entry carries exactly the record the file holds (zod cannot compare two parts). */
function checkOutboxMatches(file: BackupFile): void {
  const rounds = new Map(file.rounds.map((item) => [item.round.id, item]));
  const records = new Map(file.records.map((item) => [item.body.id, item]));
  file.outbox.forEach((entry, index) => {
    const path = `outbox.${index}.envelope.body`;
    if (entry.type === 'round') {
      const item = rounds.get(entry.id);
      const body = entry.envelope.body as BackupRound;
      const same =
        item &&
        sameContent(body.round, item.round) &&
        sameContent(sortReadings(body.readings), item.readings) &&
        sameContent(sortFindings(body.findings), sortFindings(item.findings));
      if (!same)
        throw new StoreError(
          'E_INVALID',
          `The backup file is not valid: ${path}: differs from round ${entry.id} in the file`,
        );
    } else {
      const item = records.get(entry.id);
      if (!item || item.type !== entry.type || !sameContent(entry.envelope.body, item.body)) {
        throw new StoreError(
          'E_INVALID',
          `The backup file is not valid: ${path}: differs from record ${entry.id} in the file`,
        );
      }
    }
  });
}

/** Validates the whole file first, then merges it by id in one transaction. Importing the same file twice changes nothing. */
export async function importBackup(ctx: Ctx, data: unknown): Promise<ImportResult> {
  const parsed = Backup.safeParse(data);
  if (!parsed.success) throw new StoreError('E_INVALID', `The backup file is not valid: ${describe(parsed.error)}`);
  const file = parsed.data;
  checkOutboxMatches(file);
  return write(
    ctx,
    ['configs', 'rounds', 'readings', 'findings', 'records', 'outbox'],
    async (tx) => {
      const result: ImportResult = { added: 0, skipped: 0, conflicts: [] };
      const added = new Set<string>();

      const configs = tx.objectStore('configs');
      for (const config of file.configs as SiteConfig[]) {
        const existing = await configs.get(config.version);
        if (!existing) {
          await configs.add(config);
          result.added += 1;
        } else if (sameContent(existing, config)) result.skipped += 1;
        else
          result.conflicts.push(`configuration version ${config.version}: this tablet holds a different one; kept it`);
      }

      const rounds = tx.objectStore('rounds');
      const readings = tx.objectStore('readings');
      const findings = tx.objectStore('findings');
      for (const item of file.rounds) {
        const id = item.round.id;
        const existing = await rounds.get(id);
        if (existing) {
          const here = {
            round: existing,
            readings: sortReadings(await readings.index('byRound').getAll(id)),
            findings: sortFindings(await findings.index('byRound').getAll(id)),
          };
          const there = {
            round: item.round,
            readings: sortReadings(item.readings),
            findings: sortFindings(item.findings),
          };
          if (sameContent(here, there)) result.skipped += 1;
          else result.conflicts.push(`round ${id}: this tablet holds different content (${existing.state}); kept it`);
          continue;
        }
        let clash: string | undefined;
        for (const reading of item.readings) {
          const other = await readings.get(reading.id);
          if (other) clash ??= `reading ${reading.id} is already stored in round ${other.roundId}`;
        }
        for (const finding of item.findings) {
          const other = await findings.get(finding.key);
          if (other) clash ??= `finding ${finding.key} is already stored for round ${other.roundId}`;
        }
        if (clash) {
          result.conflicts.push(`round ${id}: ${clash}; the round was not imported`);
          continue;
        }
        await rounds.add(item.round);
        for (const reading of item.readings) await readings.add(reading);
        for (const finding of item.findings) await findings.add(finding);
        added.add(id);
        result.added += 1;
      }

      const records = tx.objectStore('records');
      for (const item of file.records) {
        const record = { id: item.body.id, type: item.type, body: item.body } as StoredRecord;
        const existing = await records.get(record.id);
        if (!existing) {
          await records.add(record);
          added.add(record.id);
          result.added += 1;
        } else if (existing.type === record.type && sameContent(existing.body, record.body)) result.skipped += 1;
        else result.conflicts.push(`${record.type} record ${record.id}: this tablet holds different content; kept it`);
      }

      // Unsent entries follow their record: queued again only where the record itself was new here.
      const outbox = tx.objectStore('outbox');
      const queue = [...file.outbox].sort((a, b) => a.seq - b.seq);
      for (const { seq: _seq, ...entry } of queue) {
        if (!added.has(entry.id)) continue;
        if ((await outbox.index('byRecordId').getKey(entry.id)) !== undefined) continue;
        await outbox.add(entry as OutboxEntry);
      }
      return result;
    },
    { userData: (result) => result.added > 0 },
  );
}
