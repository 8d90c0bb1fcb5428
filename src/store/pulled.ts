/**
 * Records pulled from the site server (other tablets' rounds, reviews, maintenance), stored together with the pull
 * cursor in ONE transaction, so a pull killed half-way neither skips nor repeats anything (reliability T5.7, P28).
 * Pulled records never enter the outbox: they are the server's already.
 */
import { parseEnvelope, RecordError, type TypedEnvelope } from '../schema';
import { sameContent } from './canonical';
import type { StoredRecord } from './db';
import { StoreError } from './errors';
import { PULL_CURSOR_KEY } from './meta';
import { type Ctx, read, write } from './tx';
import { invalid } from './validate';

export interface PulledItem {
  seq: number;
  envelope: unknown;
}

export interface PullResult {
  added: number;
  skipped: number;
  /** Ids the server holds with other content than this tablet (a conflict to look at; the local copy stays). */
  differing: string[];
  cursor: number;
}

export async function pullCursor(ctx: Ctx): Promise<number> {
  const value = await read(ctx, ['meta'], (tx) => tx.objectStore('meta').get(PULL_CURSOR_KEY));
  return typeof value === 'number' ? value : 0;
}

export async function applyPulled(ctx: Ctx, items: PulledItem[], next: number): Promise<PullResult> {
  if (!Number.isInteger(next) || next < 0)
    throw invalid(`The pull is not valid: next: must be a whole number, not ${next}`);
  // Everything is checked before the transaction opens (reliability P1).
  const envelopes: TypedEnvelope[] = items.map((item, index) => {
    try {
      return parseEnvelope(item.envelope);
    } catch (error) {
      if (error instanceof RecordError) throw invalid(`The pulled record ${index} is not valid: ${error.issues}`);
      throw error;
    }
  });
  return write(
    ctx,
    ['rounds', 'readings', 'findings', 'records', 'meta'],
    async (tx) => {
      const meta = tx.objectStore('meta');
      const current = (await meta.get(PULL_CURSOR_KEY)) as number | undefined;
      if (current !== undefined && next < current) {
        throw new StoreError('E_CONFLICT', `The pull cursor would move back from ${current} to ${next}; pull again.`);
      }
      let added = 0;
      let skipped = 0;
      const differing: string[] = [];
      for (const envelope of envelopes) {
        if (envelope.type === 'round') {
          const body = (envelope as TypedEnvelope<'round'>).body;
          const rounds = tx.objectStore('rounds');
          const existing = await rounds.get(body.round.id);
          if (existing) {
            if (!sameContent(existing, body.round)) differing.push(envelope.id);
            skipped += 1;
            continue;
          }
          await rounds.add(body.round);
          for (const reading of body.readings) await tx.objectStore('readings').put(reading);
          for (const finding of body.findings) await tx.objectStore('findings').put(finding);
          added += 1;
          continue;
        }
        const records = tx.objectStore('records');
        const existing = await records.get(envelope.id);
        if (existing) {
          if (!sameContent(existing.body, envelope.body)) differing.push(envelope.id);
          skipped += 1;
          continue;
        }
        await records.add({ id: envelope.id, type: envelope.type, body: envelope.body } as StoredRecord);
        added += 1;
      }
      await meta.put(Math.max(next, current ?? 0), PULL_CURSOR_KEY);
      return { added, skipped, differing, cursor: Math.max(next, current ?? 0) };
    },
    { userData: (result) => result.added > 0 },
  );
}
