/**
 * The server's own findings. Each round record is evaluated again with the checks the tablet runs (src/checks), on
 * the site configuration version the round names and the readings of the 20 round records finished before it, and
 * every difference from what the device computed is kept as a mismatch. Also the supervisor's findings query.
 */
import { evaluateRound } from '../checks';
import { type Finding, type FinishedRound, type Reading, SiteConfig, type TypedEnvelope } from '../schema';
import type { Database } from './db';
import type { Logger } from './errors';

/** How many earlier rounds give the history (trends, previous bearing temperature). */
export const HISTORY_ROUNDS = 20;

/** Rules whose result depends only on the round itself: device and server must agree on each key. */
export const HISTORY_FREE_RULES: ReadonlySet<Finding['rule']> = new Set([
  'limits',
  'answer',
  'dischargeTemperature',
  'stagePerformance',
  'valveCovers',
  'rodLoad',
]);

export const SEVERITY_RANK = { ok: 0, watch: 1, alarm: 2, trip: 3 } as const;
type Severity = keyof typeof SEVERITY_RANK;

/** Parsed readings of stored rounds kept in memory (records never change); bounded. */
const READINGS_CACHE_SIZE = 256;

export interface Mismatch {
  key: string;
  rule: Finding['rule'];
  device: Severity | null;
  server: Severity | null;
}

/** The worst severity per key (a rule may give one subject two findings, e.g. a trend both ways). */
function severities(findings: readonly Finding[]): Map<string, { rule: Finding['rule']; severity: Severity }> {
  const byKey = new Map<string, { rule: Finding['rule']; severity: Severity }>();
  for (const finding of findings) {
    const seen = byKey.get(finding.key);
    if (!seen || SEVERITY_RANK[finding.severity] > SEVERITY_RANK[seen.severity]) {
      byKey.set(finding.key, { rule: finding.rule, severity: finding.severity });
    }
  }
  return byKey;
}

/**
 * Where the device's findings differ from the server's. Rules that depend only on the round are compared on every
 * key, missing on either side included; bearingTemperature, trend and input findings depend on the history each
 * side had (or come from those checks), so they are compared only where both sides have the key.
 */
export function compareFindings(device: readonly Finding[], server: readonly Finding[]): Mismatch[] {
  const d = severities(device);
  const s = severities(server);
  const mismatches: Mismatch[] = [];
  for (const key of new Set([...d.keys(), ...s.keys()])) {
    const mine = d.get(key);
    const theirs = s.get(key);
    const rule = (mine ?? theirs)?.rule;
    if (!rule) continue;
    const strict = HISTORY_FREE_RULES.has(rule);
    if (!strict && (!mine || !theirs)) continue;
    if (mine?.severity === theirs?.severity) continue;
    mismatches.push({ key, rule, device: mine?.severity ?? null, server: theirs?.severity ?? null });
  }
  return mismatches;
}

/** Evaluates stored round records. Statements are prepared once; call only inside the ingest transaction. */
export class RoundEvaluator {
  private readonly configs = new Map<number, SiteConfig>();
  private readonly readings = new Map<number, Reading[]>();
  private readonly configBody;
  private readonly previousRounds;
  private readonly recordBody;
  private readonly insertRound;
  private readonly insertFinding;
  private readonly insertMismatch;

  constructor(
    db: Database,
    private readonly log: Logger,
  ) {
    this.configBody = db.prepare<[number], { body: string }>('SELECT body FROM site_configs WHERE version = ?');
    this.previousRounds = db.prepare<[number, string, number], { record_seq: number }>(
      `SELECT record_seq FROM server_rounds WHERE finished_ms < ? AND round_id <> ?
       ORDER BY finished_ms DESC, record_seq DESC LIMIT ?`,
    );
    this.recordBody = db.prepare<[number], { body: string }>('SELECT body FROM records WHERE seq = ?');
    this.insertRound = db.prepare(
      `INSERT INTO server_rounds (round_id, record_seq, author, route_id, config_version, finished_at, finished_ms,
         evaluation, evaluated_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    this.insertFinding = db.prepare(
      `INSERT INTO server_findings (round_id, key, rule, machine_id, subject, severity, severity_rank, message, numbers,
         round_finished_at, round_finished_ms, author)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    this.insertMismatch = db.prepare(
      'INSERT INTO finding_mismatches (round_id, key, rule, device_severity, server_severity) VALUES (?, ?, ?, ?, ?)',
    );
  }

  /** Drops what was cached during a transaction that then rolled back (its sequence numbers may be reused). */
  forgetUncommitted(): void {
    this.readings.clear();
  }

  private config(version: number): SiteConfig | null {
    const cached = this.configs.get(version);
    if (cached) return cached;
    const row = this.configBody.get(version);
    if (!row) return null;
    const config = SiteConfig.parse(JSON.parse(row.body));
    this.configs.set(version, config);
    return config;
  }

  private readingsOf(seq: number): Reading[] {
    const cached = this.readings.get(seq);
    if (cached) return cached;
    const row = this.recordBody.get(seq);
    const readings = row ? (JSON.parse(row.body) as FinishedRound).readings : [];
    this.readings.set(seq, readings);
    if (this.readings.size > READINGS_CACHE_SIZE) {
      const oldest = this.readings.keys().next().value;
      if (oldest !== undefined) this.readings.delete(oldest);
    }
    return readings;
  }

  /** Evaluates a just-stored round record and stores its findings and mismatches. */
  evaluate(envelope: TypedEnvelope<'round'>, seq: number, evaluatedAt: string): void {
    const { round, readings, findings: deviceFindings } = envelope.body;
    const finishedAt = round.finishedAt ?? round.startedAt;
    const finishedMs = Date.parse(finishedAt);
    const config = this.config(round.configVersion);
    let findings: Finding[] = [];
    let evaluation: 'done' | 'noConfig' | 'failed' = 'done';
    if (!config) {
      evaluation = 'noConfig';
    } else {
      const history = this.previousRounds
        .all(finishedMs, round.id, HISTORY_ROUNDS)
        .flatMap((row) => this.readingsOf(row.record_seq));
      try {
        findings = evaluateRound(config, readings, { readings: history });
      } catch (err) {
        evaluation = 'failed';
        this.log({
          time: evaluatedAt,
          level: 'error',
          event: 'round-evaluation-failed',
          roundId: round.id,
          error: err instanceof Error ? `${err.name}: ${err.message}` : String(err),
        });
      }
    }
    this.insertRound.run(
      round.id,
      seq,
      envelope.author,
      round.routeId,
      round.configVersion,
      finishedAt,
      finishedMs,
      evaluation,
      evaluatedAt,
    );
    if (evaluation !== 'done') return;
    for (const finding of findings) {
      this.insertFinding.run(
        round.id,
        finding.key,
        finding.rule,
        finding.subject.machineId,
        JSON.stringify(finding.subject),
        finding.severity,
        SEVERITY_RANK[finding.severity],
        finding.message,
        JSON.stringify(finding.numbers),
        finishedAt,
        finishedMs,
        envelope.author,
      );
    }
    for (const mismatch of compareFindings(deviceFindings, findings)) {
      this.insertMismatch.run(round.id, mismatch.key, mismatch.rule, mismatch.device, mismatch.server);
    }
  }
}

export interface FindingsFilter {
  machine?: string;
  minSeverity: 'watch' | 'alarm' | 'trip';
  state?: 'open' | 'reviewed';
  fromMs?: number;
  toMs?: number;
  limit: number;
}

export interface ServerFinding {
  roundId: string;
  key: string;
  rule: string;
  machineId: string;
  subject: Record<string, unknown>;
  severity: Severity;
  message: string;
  numbers: Record<string, number | null>;
  roundFinishedAt: string;
  author: string;
  reviewState: 'open' | 'reviewed';
  /** Set when the device's own evaluation of this finding differed (null device severity: the device had none). */
  mismatch: { deviceSeverity: Severity | null; serverSeverity: Severity } | null;
  latestReview: {
    id: string;
    disposition: string;
    by: { id: string; name: string };
    comment: string;
    at: string;
  } | null;
}

interface FindingRow {
  round_id: string;
  key: string;
  rule: string;
  machine_id: string;
  subject: string;
  severity: Severity;
  message: string;
  numbers: string;
  round_finished_at: string;
  author: string;
  review_id: string | null;
  disposition: string | null;
  by_id: string | null;
  by_name: string | null;
  comment: string | null;
  review_at: string | null;
  device_severity: Severity | null;
  mismatched: number;
}

/**
 * The supervisor's findings list: server findings, newest round first, with the latest review of each. The literal
 * `severity_rank >= 1` (always true here: the least severity asked for is watch) lets SQLite use the partial index
 * of listed findings from migration 004; a bound parameter alone would not.
 */
export class FindingsQuery {
  private readonly select;

  constructor(db: Database) {
    this.select = db.prepare<Record<string, string | number | null>, FindingRow>(
      `SELECT f.round_id, f.key, f.rule, f.machine_id, f.subject, f.severity, f.message, f.numbers,
              f.round_finished_at, f.author,
              r.id AS review_id, v.disposition, v.by_id, v.by_name, v.comment, v.at AS review_at,
              (SELECT m.device_severity FROM finding_mismatches m
                WHERE m.round_id = f.round_id AND m.key = f.key LIMIT 1) AS device_severity,
              EXISTS (SELECT 1 FROM finding_mismatches m
                WHERE m.round_id = f.round_id AND m.key = f.key) AS mismatched
       FROM server_findings f
       LEFT JOIN finding_reviews v ON v.record_seq = (
         SELECT record_seq FROM finding_reviews WHERE finding_key = f.key ORDER BY at_ms DESC, record_seq DESC LIMIT 1)
       LEFT JOIN records r ON r.seq = v.record_seq
       WHERE f.severity_rank >= 1 AND f.severity_rank >= @minRank
         AND (@machine IS NULL OR f.machine_id = @machine)
         AND (@fromMs IS NULL OR f.round_finished_ms >= @fromMs)
         AND (@toMs IS NULL OR f.round_finished_ms <= @toMs)
         AND (@state IS NULL OR (CASE WHEN v.record_seq IS NULL THEN 'open' ELSE 'reviewed' END) = @state)
       ORDER BY f.round_finished_ms DESC, f.id DESC
       LIMIT @limit`,
    );
  }

  run(filter: FindingsFilter): { findings: ServerFinding[]; more: boolean } {
    const rows = this.select.all({
      minRank: SEVERITY_RANK[filter.minSeverity],
      machine: filter.machine ?? null,
      fromMs: filter.fromMs ?? null,
      toMs: filter.toMs ?? null,
      state: filter.state ?? null,
      limit: filter.limit + 1,
    });
    const more = rows.length > filter.limit;
    const findings = rows.slice(0, filter.limit).map(
      (row): ServerFinding => ({
        roundId: row.round_id,
        key: row.key,
        rule: row.rule,
        machineId: row.machine_id,
        subject: JSON.parse(row.subject) as Record<string, unknown>,
        severity: row.severity,
        message: row.message,
        numbers: JSON.parse(row.numbers) as Record<string, number | null>,
        roundFinishedAt: row.round_finished_at,
        author: row.author,
        reviewState: row.review_id === null ? 'open' : 'reviewed',
        mismatch: row.mismatched ? { deviceSeverity: row.device_severity, serverSeverity: row.severity } : null,
        latestReview:
          row.review_id === null
            ? null
            : {
                id: row.review_id,
                disposition: row.disposition ?? '',
                by: { id: row.by_id ?? '', name: row.by_name ?? '' },
                comment: row.comment ?? '',
                at: row.review_at ?? '',
              },
      }),
    );
    return { findings, more };
  }
}
