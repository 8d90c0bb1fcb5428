/**
 * The supervisor's findings query over about a million stored readings. The data folder is built once through the
 * server's own ingest path (each round evaluated again by the server, its findings stored): consecutive 90-day demo
 * histories, each with its own seed and end date, back to back until the round records hold at least 1,000,000
 * readings; then every watch-or-worse finding older than two weeks gets a supervisor's review record, as on a
 * site where the board is kept up. The folder is cached in test-output/bench-data/ under GENERATOR_VERSION (bump it
 * when the generation changes), so later runs only open it; its build time is reported on its own row.
 * Timed: FindingsQuery.run directly, and GET /api/v1/findings through app.request as a signed-in supervisor, with
 * the filters the board uses (all machines, one machine, severity alarm, the last 7 days). Target: p95 < 100 ms.
 */
import { randomUUID } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { DEMO_DAYS, DEMO_END, DEMO_PEOPLE, DEMO_SEED, demoConfig, demoEnvelopes, demoHistory } from '../../src/demo';
import { envelopeFor, type Review } from '../../src/schema';
import { createApp } from '../../src/server/app';
import { type Database, openDatabase } from '../../src/server/db';
import { type FindingsFilter, FindingsQuery } from '../../src/server/findings';
import { Ingestor } from '../../src/server/ingest';
import { insertConfig } from '../../src/server/records';
import { createUsers } from '../../src/server/users';
import type { BenchRow } from './rows';

/** Bump when anything below changes what is generated, so a stale cached folder is not reused. */
const GENERATOR_VERSION = 1;
const TARGET_READINGS = 1_000_000;
const DAY_MS = 86_400_000;
const REVIEWED_BEFORE_DAYS = 14;
const REVIEW_BATCH = 5000;
const PASSCODE = 'bench-findings-1';
const WARM_UP = 5;
const RUNS = 60;
const TARGET_MS = 100;

const DATA_DIR = resolve(import.meta.dirname, '../../test-output/bench-data', `findings-v${GENERATOR_VERSION}`);
const META_FILE = 'bench-meta.json';

interface BuildMeta {
  generatorVersion: number;
  readings: number;
  rounds: number;
  findings: number;
  listed: number;
  reviews: number;
  days: number;
  buildMs: number;
  builtAt: string;
}

/** The demo history of chunk `k` (0 = the newest 90 days, ending at DEMO_END; k = 1 the 90 days before, …). */
function chunk(k: number) {
  return demoHistory({
    days: DEMO_DAYS,
    seed: DEMO_SEED + k,
    end: new Date(Date.parse(DEMO_END) - k * DEMO_DAYS * DAY_MS).toISOString(),
  });
}

const readingsIn = (history: ReturnType<typeof demoHistory>) =>
  history.rounds.reduce((sum, round) => sum + round.readings.length, 0);

async function buildDataFolder(): Promise<BuildMeta> {
  const start = performance.now();
  const parent = resolve(DATA_DIR, '..');
  mkdirSync(parent, { recursive: true });
  const building = mkdtempSync(join(parent, `findings-v${GENERATOR_VERSION}.building-`));
  try {
    const db = openDatabase(building);
    try {
      const receivedAt = new Date().toISOString();
      insertConfig(db, demoConfig(), receivedAt);
      await createUsers(db, [{ ...DEMO_PEOPLE.supervisor, roles: ['supervisor'], passcode: PASSCODE }]);
      const ingestor = new Ingestor(db, () => {});
      // The newest chunk tells how many chunks are needed; they are stored oldest first, as they would have arrived.
      const newest = chunk(0);
      const chunks = Math.ceil(TARGET_READINGS / readingsIn(newest));
      let readings = 0;
      for (let k = chunks - 1; k >= 0; k -= 1) {
        const history = k === 0 ? newest : chunk(k);
        readings += readingsIn(history);
        ingestor.ingestTrusted(demoEnvelopes(history), receivedAt);
        process.stdout.write(`\rfindings bench data: ${chunks - k}/${chunks} chunks, ${readings} readings`);
      }
      process.stdout.write('\n');

      // The supervisor has reviewed every listed finding older than two weeks, the day after its round.
      const reviewedBefore = Date.parse(DEMO_END) - REVIEWED_BEFORE_DAYS * DAY_MS;
      const toReview = db
        .prepare<[number], { round_id: string; key: string; round_finished_ms: number; severity: string }>(
          `SELECT round_id, key, round_finished_ms, severity FROM server_findings
           WHERE severity_rank >= 1 AND round_finished_ms < ? ORDER BY round_finished_ms`,
        )
        .all(reviewedBefore);
      const supervisor = DEMO_PEOPLE.supervisor;
      const reviews = toReview.map((finding) => {
        const at = new Date(finding.round_finished_ms + DAY_MS).toISOString();
        const body: Review = {
          id: randomUUID(),
          findingKey: finding.key,
          roundId: finding.round_id,
          by: supervisor,
          disposition: finding.severity === 'watch' ? 'monitor' : 'actionRaised',
          comment: finding.severity === 'watch' ? 'Seen; keep an eye on it.' : 'Work order raised for the crew.',
          at,
        };
        return envelopeFor('review', body, { author: supervisor.id, device: 'office-1', createdAt: at });
      });
      for (let from = 0; from < reviews.length; from += REVIEW_BATCH) {
        ingestor.ingestTrusted(reviews.slice(from, from + REVIEW_BATCH), receivedAt);
      }
      // No ANALYZE: a site server never runs it, so the planner works here without statistics, as it does there.

      const count = (sql: string) => Number(db.prepare(sql).pluck().get());
      const meta: BuildMeta = {
        generatorVersion: GENERATOR_VERSION,
        readings: count(`SELECT sum(json_array_length(body, '$.readings')) FROM records WHERE type = 'round'`),
        rounds: count('SELECT count(*) FROM server_rounds'),
        findings: count('SELECT count(*) FROM server_findings'),
        listed: count('SELECT count(*) FROM server_findings WHERE severity_rank >= 1'),
        reviews: count('SELECT count(*) FROM finding_reviews'),
        days: chunks * DEMO_DAYS,
        buildMs: Math.round(performance.now() - start),
        builtAt: new Date().toISOString(),
      };
      writeFileSync(join(building, META_FILE), `${JSON.stringify(meta, null, 2)}\n`);
      db.pragma('wal_checkpoint(TRUNCATE)');
      db.close();
    } catch (error) {
      db.close();
      throw error;
    }
    rmSync(DATA_DIR, { recursive: true, force: true });
    renameSync(building, DATA_DIR);
    return JSON.parse(readFileSync(join(DATA_DIR, META_FILE), 'utf8')) as BuildMeta;
  } catch (error) {
    rmSync(building, { recursive: true, force: true });
    throw error;
  }
}

function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  const index = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[index] ?? Number.NaN;
}

const round2 = (value: number) => Math.round(value * 100) / 100;

async function timed(run: () => unknown | Promise<unknown>): Promise<number[]> {
  const times: number[] = [];
  for (let i = 0; i < WARM_UP + RUNS; i += 1) {
    const start = performance.now();
    await run();
    if (i >= WARM_UP) times.push(performance.now() - start);
  }
  return times;
}

interface Case {
  name: string;
  filter: Omit<FindingsFilter, 'limit'>;
  query: string;
}

export async function findingsQuery(): Promise<BenchRow[]> {
  let built = false;
  let meta: BuildMeta;
  if (existsSync(join(DATA_DIR, META_FILE))) {
    meta = JSON.parse(readFileSync(join(DATA_DIR, META_FILE), 'utf8')) as BuildMeta;
  } else {
    meta = await buildDataFolder();
    built = true;
  }
  const openStart = performance.now();
  const db: Database = openDatabase(DATA_DIR);
  const openMs = performance.now() - openStart;
  const scratch = mkdtempSync(join(tmpdir(), 'crankhouse-bench-findings-'));
  try {
    const app = createApp({ db, distDir: scratch, version: 'bench', siteName: 'Bench', log: () => {} });
    const signIn = await app.request('/api/v1/sessions', {
      method: 'POST',
      body: JSON.stringify({
        user: DEMO_PEOPLE.supervisor.id,
        passcode: PASSCODE,
        device: { id: 'office-1', name: 'office-1' },
      }),
    });
    if (signIn.status !== 201 && signIn.status !== 200) throw new Error(`sign-in failed: ${signIn.status}`);
    const { token } = (await signIn.json()) as { token: string };

    const endMs = Date.parse(DEMO_END);
    const weekAgo = new Date(endMs - 7 * DAY_MS).toISOString();
    const cases: Case[] = [
      { name: 'all machines', filter: { minSeverity: 'watch' }, query: '' },
      { name: 'one machine', filter: { minSeverity: 'watch', machine: 'K-102' }, query: 'machine=K-102' },
      { name: 'severity alarm', filter: { minSeverity: 'alarm' }, query: 'severity=alarm' },
      {
        name: 'last 7 days',
        filter: { minSeverity: 'watch', fromMs: endMs - 7 * DAY_MS, toMs: endMs },
        query: `from=${encodeURIComponent(weekAgo)}&to=${encodeURIComponent(DEMO_END)}`,
      },
    ];
    const findings = new FindingsQuery(db);
    const verdict = (p95: number) => `target p95 < ${TARGET_MS} ms: ${p95 < TARGET_MS ? 'met' : 'NOT met'}`;
    const rows: BenchRow[] = [
      {
        figure: 'findings data: readings stored',
        value: meta.readings,
        unit: 'readings',
        note: `${meta.rounds} rounds over ${meta.days} days, ${meta.findings} server findings (${meta.listed} watch or worse), ${meta.reviews} reviews`,
      },
      {
        figure: 'findings data: build time',
        value: Math.round(meta.buildMs / 100) / 10,
        unit: 's',
        note: built
          ? `built now through the server's ingest, cached in test-output/bench-data (v${GENERATOR_VERSION})`
          : `cached from ${meta.builtAt} (v${GENERATOR_VERSION}); opened in ${Math.round(openMs)} ms`,
      },
    ];
    for (const item of cases) {
      let count = 0;
      const direct = await timed(() => {
        count = findings.run({ ...item.filter, limit: 500 }).findings.length;
      });
      const http = await timed(async () => {
        const res = await app.request(`/api/v1/findings${item.query ? `?${item.query}` : ''}`, {
          headers: { Authorization: `Bearer ${token}` },
        });
        if (res.status !== 200) throw new Error(`GET /api/v1/findings?${item.query} answered ${res.status}`);
        await res.text();
      });
      const direct95 = percentile(direct, 95);
      const http95 = percentile(http, 95);
      rows.push(
        {
          figure: `FindingsQuery ${item.name} p50`,
          value: round2(percentile(direct, 50)),
          unit: 'ms',
          note: `${RUNS} runs, ${count} findings returned (limit 500)`,
        },
        { figure: `FindingsQuery ${item.name} p95`, value: round2(direct95), unit: 'ms', note: verdict(direct95) },
        {
          figure: `GET /api/v1/findings ${item.name} p50`,
          value: round2(percentile(http, 50)),
          unit: 'ms',
          note: `${RUNS} runs via app.request as a supervisor, body read`,
        },
        { figure: `GET /api/v1/findings ${item.name} p95`, value: round2(http95), unit: 'ms', note: verdict(http95) },
      );
    }
    return rows;
  } finally {
    db.close();
    rmSync(scratch, { recursive: true, force: true });
  }
}
