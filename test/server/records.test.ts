import { randomUUID } from 'node:crypto';
import { afterEach, describe, expect, it } from 'vitest';
import { parseEnvelope, type TypedEnvelope } from '../../src/schema';
import { MAX_BATCH_BYTES, MAX_BATCH_RECORDS } from '../../src/server/ingest';
import { contentHash } from '../../src/server/records';
import {
  type ApiFixture,
  call,
  countRows,
  DEVICE,
  demoRounds,
  lockoutAck,
  makeApi,
  note,
  PEOPLE,
  push,
  review,
  roundBy,
  signIn,
  valveChange,
} from './api-fixtures';

let api: ApiFixture | undefined;
afterEach(() => {
  api?.close();
  api = undefined;
});

const RECORDS = '/api/v1/records';

async function start(): Promise<ApiFixture> {
  api = await makeApi();
  return api;
}

function storedRow(api: ApiFixture, id: string): Record<string, unknown> | undefined {
  return api.db.prepare('SELECT * FROM records WHERE id = ?').get(id) as Record<string, unknown> | undefined;
}

describe('POST /api/v1/records', () => {
  it('should answer stored, duplicate, conflict and rejected per record, in order, in one batch', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const earlier = note('operator', { text: 'First version' });
    const [first] = await push(fixture.app, token, [earlier]);
    expect(first).toEqual({ id: earlier.id, status: 'stored', seq: expect.any(Number) });
    const before = storedRow(fixture, earlier.id);

    const fresh = note('operator');
    const changed = { ...earlier, body: { ...(earlier.body as object), text: 'Second version, other words' } };
    const invalid = { ...note('operator'), createdAt: 'yesterday' };
    const again = lockoutAck('operator');
    const results = await push(fixture.app, token, [fresh, earlier, changed, invalid, again, fresh]);

    expect(results.map((r) => [r.id, r.status])).toEqual([
      [fresh.id, 'stored'],
      [earlier.id, 'duplicate'],
      [earlier.id, 'conflict'],
      [invalid.id, 'rejected'],
      [again.id, 'stored'],
      [fresh.id, 'duplicate'],
    ]);
    expect(results[1]?.seq).toBe(first?.seq);
    expect(results[5]?.seq).toBe(results[0]?.seq);
    expect(results[4]?.seq).toBeGreaterThan(results[0]?.seq ?? Number.POSITIVE_INFINITY);
    expect(results[2]?.error).toMatch(/already stored with other content/);
    expect(results[2]?.seq).toBeUndefined();
    expect(results[3]?.error).toMatch(/createdAt: must be an ISO 8601 time/);

    // The stored record never changes; the other version is kept aside once.
    expect(storedRow(fixture, earlier.id)).toEqual(before);
    const conflicts = fixture.db.prepare('SELECT * FROM conflicts').all() as Array<Record<string, unknown>>;
    expect(conflicts).toHaveLength(1);
    expect(conflicts[0]).toMatchObject({
      record_id: earlier.id,
      author: 'operator',
      device: DEVICE.operator,
      content_hash: contentHash(parseEnvelope(changed)),
      stored_content_hash: contentHash(parseEnvelope(earlier)),
    });
    expect(JSON.parse(String(conflicts[0]?.envelope)).body.text).toBe('Second version, other words');
    await push(fixture.app, token, [changed]);
    expect(fixture.db.prepare('SELECT count(*) FROM conflicts').pluck().get()).toBe(1);
    expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(3);
  });

  it('should store the content hash of everything but the id, so a resend from JSON is a duplicate', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'mechanic');
    const record = valveChange('mechanic');
    const [stored] = await push(fixture.app, token, [record]);
    // Keys in another order, at every level, are the same content.
    const reverseKeys = (value: unknown): unknown => {
      if (Array.isArray(value)) return value.map(reverseKeys);
      if (value && typeof value === 'object') {
        return Object.fromEntries(
          Object.entries(value)
            .reverse()
            .map(([k, v]) => [k, reverseKeys(v)]),
        );
      }
      return value;
    };
    const reordered = reverseKeys(record);
    expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(record));
    const [resent] = await push(fixture.app, token, [reordered]);
    expect(resent).toEqual({ id: record.id, status: 'duplicate', seq: stored?.seq });
    expect(storedRow(fixture, record.id)?.content_hash).toBe(contentHash(parseEnvelope(record)));
  });

  it('should reject a record that claims another author or device and store the rest', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const mine = note('operator');
    const asOther = note('operator2');
    const otherDevice = { ...note('operator'), device: 'tablet-9' };
    const bodyClaimsOther = note('operator');
    (bodyClaimsOther.body as { by: { id: string; name: string } }).by = {
      id: PEOPLE.operator2.id,
      name: PEOPLE.operator2.name,
    };
    const results = await push(fixture.app, token, [asOther, mine, otherDevice, bodyClaimsOther]);
    expect(results.map((r) => r.status)).toEqual(['rejected', 'stored', 'rejected', 'rejected']);
    // source: OWASP ASVS 5.0 8.2.3 and 8.3.1 (author fields come from the session, never from the body)
    expect(results[0]?.error).toMatch(/claims another author \("operator2"\).*"operator"/);
    expect(results[2]?.error).toMatch(/claims another device \("tablet-9"\).*"tablet-1"/);
    expect(results[3]?.error).toMatch(/claims another author \("operator2"\)/);
    expect(fixture.db.prepare('SELECT id FROM records').pluck().all()).toEqual([mine.id]);
  });

  it('should reject a round made on another device than the session', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const round = roundBy('operator', demoRounds()[0] ?? expect.fail('no demo round'));
    round.body.round.deviceId = 'tablet-7';
    const [result] = await push(fixture.app, token, [round]);
    expect(result?.status).toBe('rejected');
    expect(result?.error).toMatch(/another device \("tablet-7"\)/);
  });

  it.each([
    ['operator', () => valveChange('mechanic'), 'valveChange'],
    ['mechanic', () => note('mechanic'), null],
    ['supervisor', () => lockoutAck('supervisor'), 'lockoutAck'],
  ] as const)('should apply the record types of the %s role', async (who, make, refused) => {
    const fixture = await start();
    const token = await signIn(fixture.app, who);
    const record: TypedEnvelope = make();
    // Re-author the record as the signed-in person so only the type decides.
    const person = PEOPLE[who];
    const body = { ...(record.body as object), by: { id: person.id, name: person.name } };
    const own = { ...record, author: person.id, device: DEVICE[who], body };
    const [result] = await push(fixture.app, token, [own]);
    if (refused === null) {
      expect(result?.status).toBe('stored');
    } else {
      expect(result?.status).toBe('rejected');
      expect(result?.error).toMatch(new RegExp(`may not record ${refused} records`));
    }
  });

  it('should let an operator record round, note and lockoutAck, and a mechanic not review', async () => {
    const fixture = await start();
    const operator = await signIn(fixture.app, 'operator');
    const round = roundBy('operator', demoRounds()[1] ?? expect.fail('no demo round'));
    const results = await push(fixture.app, operator, [round, note('operator'), lockoutAck('operator')]);
    expect(results.map((r) => r.status)).toEqual(['stored', 'stored', 'stored']);
    const mechanic = await signIn(fixture.app, 'mechanic');
    const [refused] = await push(fixture.app, mechanic, [
      review('mechanic', { roundId: round.id, findingKey: `${round.id}:limits:K-101` }),
    ]);
    expect(refused?.status).toBe('rejected');
    expect(refused?.error).toMatch(/may not record review records; it may send valveChange, bearingClearance/);
  });

  it('should accept an empty batch and exactly 500 records', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    expect(await push(fixture.app, token, [])).toEqual([]);
    const batch = Array.from({ length: MAX_BATCH_RECORDS }, () => note('operator', { text: 'x' }));
    const results = await push(fixture.app, token, batch);
    expect(results).toHaveLength(500);
    expect(results.every((r, i) => r.status === 'stored' && r.id === batch[i]?.id)).toBe(true);
  });

  describe('whole-request errors change nothing', () => {
    it.each([
      ['not JSON', '{"records": [', 400, 'E_BAD_JSON'],
      ['a bare array', '[]', 400, 'E_VALIDATION'],
      ['no records field', '{"record": []}', 400, 'E_VALIDATION'],
      ['records that are not an array', '{"records": {"0": {}}}', 400, 'E_VALIDATION'],
      ['an extra top-level field', '{"records": [], "device": "tablet-9"}', 400, 'E_VALIDATION'],
      ['null', 'null', 400, 'E_VALIDATION'],
      ['an empty body', '', 400, 'E_BAD_JSON'],
    ])('should answer %s with %i', async (_what, raw, status, code) => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      const before = countRows(fixture.db);
      const res = await call(fixture.app, 'POST', RECORDS, { token, raw });
      // source: RFC 9110 section 15.5.1 (400 Bad Request)
      expect(res.status).toBe(status);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe(code);
      expect(countRows(fixture.db)).toEqual(before);
    });

    it('should answer 400 for 501 records and store none of them', async () => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      const batch = Array.from({ length: MAX_BATCH_RECORDS + 1 }, () => note('operator', { text: 'y' }));
      const res = await call(fixture.app, 'POST', RECORDS, { token, body: { records: batch } });
      expect(res.status).toBe(400);
      expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/at most 500 records/);
      expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
    });

    it('should answer 413 for a body over 2 MiB and store none of it', async () => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      // 500 notes of 4,000 characters each: valid records, about 2.2 MB together.
      const batch = Array.from({ length: 500 }, () => note('operator', { text: 'z'.repeat(4000) }));
      const raw = JSON.stringify({ records: batch });
      expect(Buffer.byteLength(raw)).toBeGreaterThan(MAX_BATCH_BYTES);
      const res = await call(fixture.app, 'POST', RECORDS, { token, raw });
      // source: RFC 9110 section 15.5.14 (413 Content Too Large)
      expect(res.status).toBe(413);
      expect(await res.json()).toEqual({
        error: {
          code: 'E_PAYLOAD_TOO_LARGE',
          message: 'The body is larger than 2 MiB; send at most 500 records and split a larger backlog into batches',
        },
      });
      expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
    });

    it('should answer 413 from Content-Length alone, without reading the body', async () => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      // An endless body: reading it whole would never finish.
      const chunk = new Uint8Array(64 * 1024).fill(0x20);
      let pulled = 0;
      const body = new ReadableStream<Uint8Array>({
        pull(controller) {
          pulled += 1;
          controller.enqueue(chunk);
        },
      });
      const res = await fixture.app.request('/api/v1/records', {
        method: 'POST',
        headers: { Authorization: `Bearer ${token}`, 'Content-Length': String(MAX_BATCH_BYTES + 1) },
        body,
        duplex: 'half',
      } as RequestInit);
      expect(res.status).toBe(413);
      expect(pulled * chunk.length).toBeLessThan(MAX_BATCH_BYTES);
      await body.cancel();
    });

    it('should answer 400 for a body nested deeper than 64 levels, before any schema or hash walks it', async () => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      const round = roundBy('operator', demoRounds()[0] ?? expect.fail('no demo round'));
      const finding = round.body.findings[0] ?? expect.fail('no finding');
      finding.inputs = { note: 'PLACEHOLDER' };
      // Finding inputs may hold any JSON; 100,000 levels would overflow a recursive walk (JSON.stringify included).
      const levels = 100_000;
      const raw = JSON.stringify({ records: [round] }).replace(
        '"PLACEHOLDER"',
        `${'['.repeat(levels)}${']'.repeat(levels)}`,
      );
      const res = await call(fixture.app, 'POST', RECORDS, { token, raw });
      expect(res.status).toBe(400);
      expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/more than 64 levels/);
      expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
      expect(fixture.logged.filter((entry) => entry.level === 'error')).toEqual([]);
    });

    it('should answer 403 to a signed-in person who holds no role that may send records', async () => {
      const fixture = await start();
      // A role this server does not know (say, from a later version) grants nothing.
      fixture.db.prepare("UPDATE users SET roles = '[\"auditor\"]' WHERE id = 'operator'").run();
      const token = await signIn(fixture.app, 'operator');
      const res = await call(fixture.app, 'POST', RECORDS, { token, body: { records: [note('operator')] } });
      // source: RFC 9110 section 15.5.4 (403 Forbidden)
      expect(res.status).toBe(403);
      expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(
        /is for operator or mechanic or supervisor or admin; you are signed in as no role/,
      );
      expect((await call(fixture.app, 'GET', RECORDS, { token })).status).toBe(403);
      expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
    });

    it('should answer 401 without a token and 401 for a revoked one, storing nothing', async () => {
      const fixture = await start();
      const token = await signIn(fixture.app, 'operator');
      const body = { records: [note('operator')] };
      const anonymous = await call(fixture.app, 'POST', RECORDS, { body });
      expect(anonymous.status).toBe(401);
      await call(fixture.app, 'DELETE', '/api/v1/sessions/current', { token });
      const revoked = await call(fixture.app, 'POST', RECORDS, { token, body });
      expect(revoked.status).toBe(401);
      expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
    });
  });

  it('should keep the batch when one record is rejected and roll back the whole batch when the database fails', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    // A trigger that fails the third insert stands in for a disk error in the middle of the batch.
    const batch = [note('operator'), note('operator'), note('operator', { text: 'FAIL-HERE' })];
    fixture.db.exec(`CREATE TEMP TRIGGER fail_insert BEFORE INSERT ON records
      WHEN NEW.body LIKE '%FAIL-HERE%' BEGIN SELECT RAISE(ABORT, 'simulated disk error'); END`);
    const res = await call(fixture.app, 'POST', RECORDS, { token, body: { records: batch } });
    // source: RFC 9110 section 15.6.1 (500 Internal Server Error); the body stays generic
    expect(res.status).toBe(500);
    expect(await res.json()).toEqual({ error: { code: 'E_INTERNAL', message: 'Internal server error' } });
    expect(fixture.db.prepare('SELECT count(*) FROM records').pluck().get()).toBe(0);
    fixture.db.exec('DROP TRIGGER temp.fail_insert');
    const retry = await push(fixture.app, token, batch);
    expect(retry.map((r) => r.status)).toEqual(['stored', 'stored', 'stored']);
  });

  it('should log the rejected records of a batch once with the reasons', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    await push(fixture.app, token, [{ id: 'not-a-uuid' }, note('operator')]);
    const entry = fixture.logged.find((e) => e.event === 'records-rejected');
    expect(entry).toMatchObject({ user: 'operator', device: 'tablet-1', count: 1 });
    expect(JSON.stringify(entry?.first)).toMatch(/not-a-uuid.*must be a UUID/);
  });
});

describe('server findings on ingest', () => {
  it('should recompute a round with the checks and store its findings with no mismatch when the device agrees', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const source = demoRounds().at(-1) ?? expect.fail('no demo round');
    const round = roundBy('operator', source);
    const [result] = await push(fixture.app, token, [round]);
    expect(result?.status).toBe('stored');
    const stored = fixture.db.prepare('SELECT * FROM server_rounds WHERE round_id = ?').get(round.id);
    expect(stored).toMatchObject({
      author: 'operator',
      evaluation: 'done',
      config_version: 1,
      record_seq: result?.seq,
    });
    const findings = fixture.db
      .prepare('SELECT key, rule, severity FROM server_findings WHERE round_id = ?')
      .all(round.id) as Array<{ key: string; rule: string; severity: string }>;
    expect(findings.length).toBeGreaterThan(20);
    // Without history on the server only history-free findings are comparable; they match the device's exactly.
    const deviceLimits = round.body.findings.filter((f) => f.rule === 'limits').map((f) => [f.key, f.severity]);
    const serverLimits = findings.filter((f) => f.rule === 'limits').map((f) => [f.key, f.severity]);
    expect(serverLimits.sort()).toEqual(deviceLimits.sort());
    expect(fixture.db.prepare('SELECT count(*) FROM finding_mismatches').pluck().get()).toBe(0);
  });

  it('should store a mismatch row when the device claims another severity or a finding the server does not make', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const round = roundBy('operator', demoRounds().at(-2) ?? expect.fail('no demo round'));
    const limit = round.body.findings.find((f) => f.rule === 'limits' && f.severity === 'ok');
    if (!limit) throw new Error('the demo round has no ok limits finding');
    limit.severity = 'alarm';
    const invented = {
      ...limit,
      key: `${round.id}:rodLoad:K-999/1`,
      rule: 'rodLoad' as const,
      severity: 'watch' as const,
    };
    round.body.findings.push(invented);
    const dropped = round.body.findings.find((f) => f.rule === 'valveCovers');
    if (!dropped) throw new Error('the demo round has no valve cover finding');
    round.body.findings = round.body.findings.filter((f) => f !== dropped);
    // A trend only the device has depends on history: not a mismatch.
    round.body.findings.push({ ...limit, key: `${round.id}:trend:K-101/K-101-X`, rule: 'trend', severity: 'watch' });
    const [result] = await push(fixture.app, token, [round]);
    expect(result?.status).toBe('stored');
    const mismatches = fixture.db
      .prepare('SELECT key, rule, device_severity, server_severity FROM finding_mismatches ORDER BY key')
      .all();
    expect(mismatches).toEqual(
      [
        { key: limit.key, rule: 'limits', device_severity: 'alarm', server_severity: 'ok' },
        { key: invented.key, rule: 'rodLoad', device_severity: 'watch', server_severity: null },
        { key: dropped.key, rule: 'valveCovers', device_severity: null, server_severity: dropped.severity },
      ].sort((a, b) => (a.key < b.key ? -1 : 1)),
    );
  });

  it('should use the rounds finished before as history, so bearing findings agree with the device', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const rounds = demoRounds().map((source) => roundBy('operator', source));
    // About 100 kB each: in batches that stay under the body limit.
    for (let start = 0; start < rounds.length; start += 10) {
      const results = await push(fixture.app, token, rounds.slice(start, start + 10));
      expect(results.every((r) => r.status === 'stored')).toBe(true);
    }
    const last = rounds.at(-1) ?? expect.fail('no round');
    const history = fixture.db
      .prepare(
        `SELECT count(*) FROM server_rounds WHERE finished_ms < (SELECT finished_ms FROM server_rounds WHERE round_id = ?)`,
      )
      .pluck()
      .get(last.id) as number;
    expect(history).toBeGreaterThanOrEqual(20);
    // Bearing findings compare the previous round's temperature: with history on both sides they agree.
    const bearingMismatches = fixture.db
      .prepare("SELECT count(*) FROM finding_mismatches WHERE rule IN ('bearingTemperature', 'trend')")
      .pluck()
      .get();
    expect(bearingMismatches).toBe(0);
    const serverBearing = fixture.db
      .prepare("SELECT key, severity FROM server_findings WHERE round_id = ? AND rule = 'bearingTemperature'")
      .all(last.id) as Array<{ key: string; severity: string }>;
    const deviceBearing = last.body.findings
      .filter((f) => f.rule === 'bearingTemperature')
      .map((f) => ({ key: f.key, severity: f.severity }));
    expect(serverBearing.length).toBeGreaterThan(0);
    // The previous round's temperature came from the server's history.
    const rises = fixture.db
      .prepare("SELECT numbers FROM server_findings WHERE round_id = ? AND rule = 'bearingTemperature'")
      .pluck()
      .all(last.id) as string[];
    expect(rises.every((numbers) => typeof JSON.parse(numbers).riseSincePreviousK === 'number')).toBe(true);
    expect(serverBearing.sort((a, b) => (a.key < b.key ? -1 : 1))).toEqual(
      deviceBearing.sort((a, b) => (a.key < b.key ? -1 : 1)),
    );
  });

  it('should store a round that names a configuration version the server lacks, marked as not evaluated', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'operator');
    const round = roundBy('operator', demoRounds()[2] ?? expect.fail('no demo round'));
    round.body.round.configVersion = 7;
    const [result] = await push(fixture.app, token, [round]);
    expect(result?.status).toBe('stored');
    expect(fixture.db.prepare('SELECT evaluation FROM server_rounds WHERE round_id = ?').pluck().get(round.id)).toBe(
      'noConfig',
    );
    expect(fixture.db.prepare('SELECT count(*) FROM server_findings').pluck().get()).toBe(0);
  });

  it('should index reviews by finding key when a supervisor sends one', async () => {
    const fixture = await start();
    const token = await signIn(fixture.app, 'supervisor');
    const target = { roundId: randomUUID(), findingKey: 'r:limits:K-101/K-101-PD1' };
    const [result] = await push(fixture.app, token, [review('supervisor', target, { disposition: 'monitor' })]);
    expect(result?.status).toBe('stored');
    expect(fixture.db.prepare('SELECT finding_key, disposition, by_id FROM finding_reviews').get()).toEqual({
      finding_key: target.findingKey,
      disposition: 'monitor',
      by_id: 'supervisor',
    });
  });
});
