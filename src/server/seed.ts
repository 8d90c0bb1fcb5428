/**
 * First start: an empty database gets the invented demo site and its history, so that a new installation shows
 * something to explore. Skipped when a configuration exists, or when CRANKHOUSE_DEMO=0.
 */
import { demoEnvelopes, demoHistory } from '../demo';
import { parseEnvelope } from '../schema';
import type { Database } from './db';
import { insertConfig, insertRecord, latestConfig } from './records';

export interface SeedResult {
  seeded: boolean;
  records: number;
}

/** Seeds the demo site with a history that ends at the start of `now`'s day (UTC). One transaction. */
export function seedDemoSite(db: Database, now: Date = new Date()): SeedResult {
  if (latestConfig(db)) return { seeded: false, records: 0 };
  const end = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate())).toISOString();
  const history = demoHistory({ end });
  // Everything is validated exactly as if a device had sent it.
  const envelopes = demoEnvelopes(history).map((envelope) => parseEnvelope(envelope));
  const receivedAt = now.toISOString();
  let records = 0;
  db.transaction(() => {
    insertConfig(db, history.config, receivedAt);
    for (const envelope of envelopes) if (insertRecord(db, envelope, receivedAt) !== null) records += 1;
  })();
  return { seeded: true, records };
}
