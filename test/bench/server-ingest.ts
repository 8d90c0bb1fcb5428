/**
 * Speed of the sync API on the server: 50,000 small valid records (notes) pushed through `app.request` in batches of
 * 500 (HTTP handling, JSON, validation, content hash, one SQLite transaction per batch with synchronous=FULL),
 * against a bare better-sqlite3 insert loop of the same rows into a table of the same shape in one transaction;
 * then the same 50,000 pulled back in pages of 1000. Targets: at least 20,000 records/s pushed, within 5x of the
 * bare insert.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import BetterSqlite3 from 'better-sqlite3';
import { demoConfig } from '../../src/demo';
import { envelopeFor, parseEnvelope, type TypedEnvelope } from '../../src/schema';
import { createApp } from '../../src/server/app';
import { openDatabase } from '../../src/server/db';
import { contentHash, insertConfig } from '../../src/server/records';
import { createUsers } from '../../src/server/users';
import type { BenchRow } from './rows';

const RECORDS = 50_000;
const BATCH = 500;
const PAGE = 1000;
const TARGET_PER_S = 20_000;
const TARGET_RATIO = 5;
const RUNS = 3;

/** The records table as migration 002 makes it, for the bare insert. */
const SAME_SHAPE = `CREATE TABLE records (
  seq INTEGER PRIMARY KEY AUTOINCREMENT,
  id TEXT NOT NULL UNIQUE,
  type TEXT NOT NULL,
  schema INTEGER NOT NULL,
  author TEXT NOT NULL,
  device TEXT NOT NULL,
  created_at TEXT NOT NULL,
  received_at TEXT NOT NULL,
  body TEXT NOT NULL,
  content_hash TEXT NOT NULL
) STRICT;
CREATE INDEX records_by_type ON records (type, seq);`;

function notes(): TypedEnvelope[] {
  const by = { id: 'mechanic', name: 'Priya Nandakumar' };
  return Array.from({ length: RECORDS }, (_, index) => {
    const at = new Date(Date.UTC(2026, 11, 1, 6, 0, 0, index)).toISOString();
    return envelopeFor(
      'note',
      {
        id: randomUUID(),
        roundId: randomUUID(),
        by,
        at,
        text: `Packing vent on C2 checked with the detector: 0 %LEL (${index}).`,
      },
      { author: by.id, device: 'tablet-2', createdAt: at },
    );
  });
}

const perSecond = (count: number, ms: number) => Math.round((count / ms) * 1000);

interface ApiRun {
  pushMs: number;
  pullMs: number;
}

/** One push of every record through the API into a fresh database, then one pull of them all. */
async function apiRun(scratch: string, run: number, records: TypedEnvelope[]): Promise<ApiRun> {
  const db = openDatabase(join(scratch, `api-${run}`));
  try {
    insertConfig(db, demoConfig(), new Date().toISOString());
    await createUsers(db, [
      { id: 'mechanic', name: 'Priya Nandakumar', roles: ['mechanic'], passcode: 'bench-123' },
      { id: 'supervisor', name: 'Dale Whitford', roles: ['supervisor'], passcode: 'bench-123' },
    ]);
    const app = createApp({ db, distDir: scratch, version: 'bench', siteName: 'Bench', log: () => {} });
    const signIn = async (user: string, device: string) => {
      const res = await app.request('/api/v1/sessions', {
        method: 'POST',
        body: JSON.stringify({ user, passcode: 'bench-123', device: { id: device, name: device } }),
      });
      return ((await res.json()) as { token: string }).token;
    };
    const mechanic = await signIn('mechanic', 'tablet-2');
    const supervisor = await signIn('supervisor', 'office-1');
    // The JSON text of each batch is made beforehand, as the tablet's outbox holds it.
    const bodies: string[] = [];
    for (let start = 0; start < RECORDS; start += BATCH) {
      bodies.push(JSON.stringify({ records: records.slice(start, start + BATCH) }));
    }

    const pushStart = performance.now();
    let stored = 0;
    for (const body of bodies) {
      const res = await app.request('/api/v1/records', {
        method: 'POST',
        // A browser's fetch sends the length of a string body, as the tablet's push does.
        headers: {
          Authorization: `Bearer ${mechanic}`,
          'Content-Type': 'application/json',
          'Content-Length': String(Buffer.byteLength(body)),
        },
        body,
      });
      const { results } = (await res.json()) as { results: Array<{ status: string }> };
      stored += results.filter((result) => result.status === 'stored').length;
    }
    const pushMs = performance.now() - pushStart;
    if (stored !== RECORDS) throw new Error(`only ${stored} of ${RECORDS} records were stored`);

    // Pull them back, page by page, as a supervisor (who reads everything).
    const pullStart = performance.now();
    let pulled = 0;
    let after = 0;
    for (;;) {
      const res = await app.request(`/api/v1/records?after=${after}&limit=${PAGE}`, {
        headers: { Authorization: `Bearer ${supervisor}` },
      });
      const page = (await res.json()) as { records: unknown[]; next: number; more: boolean };
      pulled += page.records.length;
      after = page.next;
      if (!page.more) break;
    }
    const pullMs = performance.now() - pullStart;
    if (pulled !== RECORDS) throw new Error(`pulled ${pulled} of ${RECORDS} records`);
    return { pushMs, pullMs };
  } finally {
    db.close();
  }
}

type Row = readonly [string, string, number, string, string, string, string, string, string];

/** The bare insert: the same rows, values made beforehand, one transaction, the same durability settings. */
function bareRun(scratch: string, run: number, rows: readonly Row[]): number {
  const raw = new BetterSqlite3(join(scratch, `bare-${run}.sqlite`));
  try {
    raw.pragma('journal_mode = WAL');
    raw.pragma('synchronous = FULL');
    raw.exec(SAME_SHAPE);
    const insert = raw.prepare(
      `INSERT INTO records (id, type, schema, author, device, created_at, received_at, body, content_hash)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const start = performance.now();
    raw.transaction(() => {
      for (const row of rows) insert.run(...row);
    })();
    return performance.now() - start;
  } finally {
    raw.close();
  }
}

export async function serverIngest(): Promise<BenchRow[]> {
  const scratch = mkdtempSync(join(tmpdir(), 'crankhouse-bench-server-'));
  try {
    const receivedAt = new Date().toISOString();
    const api: ApiRun[] = [];
    const bare: number[] = [];
    // Best of several runs of each, so other work on the machine counts against neither side.
    for (let run = 0; run < RUNS; run += 1) {
      const records = notes();
      api.push(await apiRun(scratch, run, records));
      const rows = records.map((record): Row => {
        const valid = parseEnvelope(record);
        return [
          valid.id,
          valid.type,
          valid.schema,
          valid.author,
          valid.device,
          valid.createdAt,
          receivedAt,
          JSON.stringify(valid.body),
          contentHash(valid),
        ];
      });
      bare.push(bareRun(scratch, run, rows));
    }
    const pushMs = Math.min(...api.map((run) => run.pushMs));
    const pullMs = Math.min(...api.map((run) => run.pullMs));
    const bareMs = Math.min(...bare);

    const pushRate = perSecond(RECORDS, pushMs);
    const bareRate = perSecond(RECORDS, bareMs);
    const ratio = Math.round((pushMs / bareMs) * 10) / 10;
    const verdict = (ok: boolean) => (ok ? 'meets' : 'MISSES');
    const summary = [
      `server ingest: push ${pushRate} records/s (target >= ${TARGET_PER_S}: ${verdict(pushRate >= TARGET_PER_S)})`,
      `${ratio}x the bare insert (target <= ${TARGET_RATIO}: ${verdict(ratio <= TARGET_RATIO)})`,
      `pull ${perSecond(RECORDS, pullMs)} records/s`,
    ];
    console.log(summary.join('; '));
    return [
      {
        figure: 'push 50,000 notes',
        value: pushRate,
        unit: 'records/s',
        note: `${BATCH} per POST /api/v1/records via app.request, best of ${RUNS}; target >= ${TARGET_PER_S}: ${verdict(pushRate >= TARGET_PER_S)}`,
      },
      {
        figure: 'bare SQLite insert',
        value: bareRate,
        unit: 'records/s',
        note: `same rows, same-shaped table, one transaction, WAL + synchronous=FULL, best of ${RUNS}`,
      },
      {
        figure: 'push vs bare insert',
        value: ratio,
        unit: 'x slower',
        note: `target <= ${TARGET_RATIO}: ${verdict(ratio <= TARGET_RATIO)}`,
      },
      {
        figure: 'pull 50,000 records',
        value: perSecond(RECORDS, pullMs),
        unit: 'records/s',
        note: `GET /api/v1/records pages of ${PAGE} as a supervisor, best of ${RUNS}`,
      },
    ];
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}
