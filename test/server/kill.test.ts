/**
 * The server killed during uploads: the real server (main.ts in a child process) takes batches of records while it
 * is SIGKILLed at random moments and restarted on the same data folder. An acknowledged record must survive every
 * kill with the same content (an ack means durable), and re-sending everything must leave each id stored once.
 * source: SQLite WAL with synchronous=FULL keeps every committed transaction through a process crash
 * (sqlite.org/pragma.html#pragma_synchronous, sqlite.org/atomiccommit.html); the check is the "set" oracle of
 * crash testing: no acknowledged element lost, none counted twice (common practice).
 */
import { randomUUID } from 'node:crypto';
import { join } from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { envelopeFor, parseEnvelope, type TypedEnvelope } from '../../src/schema';
import { contentHash } from '../../src/server/records';
import { type Child, killIfRunning, SEED_WAIT_MS, spawnMain, WAIT_MS, waitForExit, waitForOutput } from './child';
import { makeTempDir, writeFakeDist } from './fixtures';

const PASSCODE = 'kill-test-2468';
const DEVICE = { id: 'tablet-k', name: 'Crash test tablet' };
const KILLS = 3;
const BATCH = 50;

let temp: ReturnType<typeof makeTempDir>;
let dataDir: string;
let distDir: string;
const children: Child[] = [];

beforeEach(() => {
  temp = makeTempDir('kill');
  dataDir = join(temp.path, 'data');
  distDir = join(temp.path, 'dist');
  writeFakeDist(distDir);
});
afterEach(() => {
  for (const child of children.splice(0)) killIfRunning(child);
  temp.remove();
});

/** A small deterministic generator (mulberry32), so a failing run can be repeated from its seed. */
function seeded(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4_294_967_296;
  };
}

async function startChild(): Promise<{ child: Child; url: string }> {
  const child = spawnMain({
    PORT: '0',
    HOST: '127.0.0.1',
    CRANKHOUSE_DATA: dataDir,
    CRANKHOUSE_DIST: distDir,
    CRANKHOUSE_DEMO: '1',
    CRANKHOUSE_DEMO_PASSCODE: PASSCODE,
  });
  children.push(child);
  const match = await waitForOutput(child, /running at (http:\/\/127\.0\.0\.1:\d+)\n/, SEED_WAIT_MS);
  return { child, url: match[1] as string };
}

function makeRecord(index: number): TypedEnvelope {
  const by = { id: 'mechanic', name: 'Priya Nandakumar' };
  const at = new Date(Date.UTC(2026, 11, 1, 8, 0, index)).toISOString();
  const meta = { author: 'mechanic', device: DEVICE.id, createdAt: at };
  if (index % 2 === 0) {
    return envelopeFor(
      'note',
      { id: randomUUID(), roundId: randomUUID(), by, at, text: `Crash test note ${index}` },
      meta,
    );
  }
  return envelopeFor(
    'lockoutAck',
    {
      id: randomUUID(),
      task: { kind: 'rodDrop', machineId: 'K-102', ref: 'C2' },
      cautionSetId: 'open-machine',
      configVersion: 1,
      by,
      acknowledgements: [{ cautionId: 'permit', at }],
      completedAt: at,
    },
    meta,
  );
}

async function post(url: string, token: string, records: TypedEnvelope[]) {
  const res = await fetch(`${url}/api/v1/records`, {
    method: 'POST',
    headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
    body: JSON.stringify({ records }),
    signal: AbortSignal.timeout(WAIT_MS),
  });
  if (res.status !== 200) throw new Error(`push answered ${res.status}`);
  return ((await res.json()) as { results: Array<{ id: string; status: string }> }).results;
}

/** Every record this tablet sent that the mechanic can pull, by id, with the count of each id and its hash. */
async function pulled(url: string, token: string): Promise<Map<string, { count: number; hash: string }>> {
  const seen = new Map<string, { count: number; hash: string }>();
  let after = 0;
  for (let page = 0; page < 1000; page += 1) {
    const res = await fetch(`${url}/api/v1/records?after=${after}&limit=1000`, {
      headers: { Authorization: `Bearer ${token}` },
      signal: AbortSignal.timeout(WAIT_MS),
    });
    expect(res.status).toBe(200);
    const body = (await res.json()) as { records: Array<Record<string, unknown>>; next: number; more: boolean };
    for (const record of body.records) {
      const { seq: _seq, ...envelope } = record;
      if (envelope.device !== DEVICE.id) continue;
      const id = String(envelope.id);
      const hash = contentHash(parseEnvelope(envelope));
      seen.set(id, { count: (seen.get(id)?.count ?? 0) + 1, hash });
    }
    after = body.next;
    if (!body.more) return seen;
  }
  throw new Error('pull did not end within 1000 pages');
}

describe('server killed during uploads', () => {
  it(`should keep every acknowledged record through ${KILLS} SIGKILLs and store each id once`, {
    timeout: 300_000,
  }, async () => {
    const seed = Date.now() % 1_000_000;
    console.info(`kill test seed ${seed}`);
    const random = seeded(seed);

    try {
      await uploadThroughKills(random);
    } finally {
      for (const child of children.splice(0)) killIfRunning(child);
    }
  });
});

async function uploadThroughKills(random: () => number): Promise<void> {
  let { child, url } = await startChild();
  const signIn = await fetch(`${url}/api/v1/sessions`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ user: 'mechanic', passcode: PASSCODE, device: DEVICE }),
    signal: AbortSignal.timeout(WAIT_MS),
  });
  expect(signIn.status).toBe(201);
  const { token } = (await signIn.json()) as { token: string };

  const sent: TypedEnvelope[] = [];
  const sentIds = new Set<string>();
  const acked = new Map<string, string>();
  let batchesAcked = 0;

  for (let kill = 0; kill < KILLS; kill += 1) {
    const delayMs = 100 + Math.floor(random() * 1000);
    const timer = setTimeout(() => child.process.kill('SIGKILL'), delayMs);
    try {
      // Push until the kill cuts a request; a bound keeps the loop finite if the kill never lands.
      for (let batch = 0; batch < 10_000; batch += 1) {
        const records = Array.from({ length: BATCH }, () => makeRecord(sent.length + 1));
        // Now and then resend an earlier batch, acknowledged or not, as a tablet does after a lost answer.
        if (sent.length > BATCH && random() < 0.2) {
          const from = Math.floor(random() * (sent.length - BATCH));
          records.splice(0, 10, ...sent.slice(from, from + 10));
        }
        for (const record of records) {
          if (sentIds.has(record.id)) continue;
          sentIds.add(record.id);
          sent.push(record);
        }
        let results: Array<{ id: string; status: string }>;
        try {
          results = await post(url, token, records);
        } catch {
          break;
        }
        for (const [index, result] of results.entries()) {
          const record = records[index];
          expect(result.id).toBe(record?.id);
          expect(['stored', 'duplicate']).toContain(result.status);
          if (record) acked.set(record.id, contentHash(parseEnvelope(record)));
        }
        batchesAcked += 1;
      }
    } finally {
      clearTimeout(timer);
    }
    expect((await waitForExit(child)).signal).toBe('SIGKILL');

    ({ child, url } = await startChild());
    const present = await pulled(url, token);
    const lost = [...acked].filter(([id, hash]) => present.get(id)?.hash !== hash);
    expect(lost).toEqual([]);
    expect([...present.values()].every((entry) => entry.count === 1)).toBe(true);
  }
  console.info(`kill test: ${batchesAcked} batches acknowledged, ${acked.size} records acked, ${sent.length} sent`);
  expect(acked.size).toBeGreaterThan(0);

  // Re-sending everything stores what the kills cut off and duplicates the rest.
  for (let start = 0; start < sent.length; start += 500) {
    const results = await post(url, token, sent.slice(start, start + 500));
    for (const result of results) expect(['stored', 'duplicate']).toContain(result.status);
  }
  const present = await pulled(url, token);
  expect(present.size).toBe(sent.length);
  for (const record of sent) {
    expect(present.get(record.id)).toEqual({ count: 1, hash: contentHash(parseEnvelope(record)) });
  }

  child.process.kill('SIGTERM');
  expect(await waitForExit(child)).toEqual({ code: 0, signal: null });
  const db = new BetterSqlite3(join(dataDir, 'crankhouse.sqlite'), { readonly: true });
  try {
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(db.pragma('foreign_key_check')).toEqual([]);
    expect(db.prepare('SELECT count(*) FROM records WHERE device = ?').pluck().get(DEVICE.id)).toBe(sent.length);
    expect(db.prepare('SELECT count(*) FROM conflicts').pluck().get()).toBe(0);
  } finally {
    db.close();
  }
}
