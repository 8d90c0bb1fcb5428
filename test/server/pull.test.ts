import { afterEach, describe, expect, it } from 'vitest';
import { parseEnvelope } from '../../src/schema';
import { contentHash } from '../../src/server/records';
import {
  type ApiFixture,
  call,
  demoRounds,
  lockoutAck,
  makeApi,
  note,
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

interface Page {
  records: Array<{ seq: number; id: string; type: string; author: string; body: Record<string, unknown> }>;
  next: number;
  more: boolean;
}

async function pull(fixture: ApiFixture, token: string, query = ''): Promise<Page> {
  const res = await call(fixture.app, 'GET', `/api/v1/records${query}`, { token });
  if (res.status !== 200) throw new Error(`pull answered ${res.status}: ${await res.text()}`);
  expect(res.headers.get('Content-Type')).toMatch(/^application\/json/);
  expect(res.headers.get('Cache-Control')).toBe('no-store');
  return (await res.json()) as Page;
}

async function pullAll(fixture: ApiFixture, token: string, limit: number): Promise<{ pages: Page[]; ids: string[] }> {
  const pages: Page[] = [];
  let after = 0;
  for (let guard = 0; guard < 1000; guard += 1) {
    const page = await pull(fixture, token, `?after=${after}&limit=${limit}`);
    pages.push(page);
    expect(page.next).toBeGreaterThanOrEqual(after);
    after = page.next;
    if (!page.more) break;
  }
  return { pages, ids: pages.flatMap((page) => page.records.map((record) => record.id)) };
}

/** A site where everyone has sent something: operator's round with a supervisor review and a mechanic note on it. */
async function populated() {
  const fixture = await makeApi();
  api = fixture;
  const operator = await signIn(fixture.app, 'operator');
  const operator2 = await signIn(fixture.app, 'operator2');
  const mechanic = await signIn(fixture.app, 'mechanic');
  const supervisor = await signIn(fixture.app, 'supervisor');
  const round = roundBy('operator', demoRounds()[0] ?? expect.fail('no demo round'));
  const otherRound = roundBy('operator2', demoRounds()[1] ?? expect.fail('no demo round'));
  const sent = {
    round,
    otherRound,
    opNote: note('operator', { roundId: round.id }),
    op2Note: note('operator2', { roundId: otherRound.id }),
    op2Ack: lockoutAck('operator2'),
    mechAck: lockoutAck('mechanic'),
    mechValve: valveChange('mechanic'),
    mechNoteOnRound: note('mechanic', { roundId: round.id }),
    mechNoteElsewhere: note('mechanic', { roundId: otherRound.id }),
    review: review('supervisor', { roundId: round.id, findingKey: `${round.id}:limits:K-101/K-101-PS1` }),
    reviewOther: review('supervisor', { roundId: otherRound.id, findingKey: `${otherRound.id}:limits:K-101/X` }),
  };
  await push(fixture.app, operator, [sent.round, sent.opNote]);
  await push(fixture.app, operator2, [sent.otherRound, sent.op2Note, sent.op2Ack]);
  await push(fixture.app, mechanic, [sent.mechAck, sent.mechValve, sent.mechNoteOnRound, sent.mechNoteElsewhere]);
  await push(fixture.app, supervisor, [sent.review, sent.reviewOther]);
  const tokens = { operator, operator2, mechanic, supervisor, admin: await signIn(fixture.app, 'admin') };
  return { fixture, sent, tokens };
}

describe('GET /api/v1/records', () => {
  it('should return every record to a supervisor in sequence order, with the envelope as sent', async () => {
    const { fixture, sent, tokens } = await populated();
    const page = await pull(fixture, tokens.supervisor);
    expect(page.more).toBe(false);
    expect(page.records.map((r) => r.id)).toEqual([
      sent.round.id,
      sent.opNote.id,
      sent.otherRound.id,
      sent.op2Note.id,
      sent.op2Ack.id,
      sent.mechAck.id,
      sent.mechValve.id,
      sent.mechNoteOnRound.id,
      sent.mechNoteElsewhere.id,
      sent.review.id,
      sent.reviewOther.id,
    ]);
    const seqs = page.records.map((r) => r.seq);
    expect(seqs).toEqual([...seqs].sort((a, b) => a - b));
    expect(page.next).toBe(seqs.at(-1));
    // Each pulled record, without its seq, is the envelope that was sent: same content hash.
    for (const record of page.records) {
      const { seq: _seq, ...envelope } = record;
      const original = Object.values(sent).find((e) => e.id === record.id);
      expect(contentHash(parseEnvelope(envelope))).toBe(contentHash(parseEnvelope(original)));
    }
    const admin = await pull(fixture, tokens.admin);
    expect(admin.records).toHaveLength(11);
  });

  it("should give an operator their own records and the reviews and notes on their rounds, and no one else's", async () => {
    const { fixture, sent, tokens } = await populated();
    const page = await pull(fixture, tokens.operator);
    expect(page.records.map((r) => r.id)).toEqual([
      sent.round.id,
      sent.opNote.id,
      sent.mechNoteOnRound.id,
      sent.review.id,
    ]);
    // The cursor still moves past everything scanned, readable or not.
    const all = await pull(fixture, tokens.supervisor);
    expect(page.next).toBe(all.records.at(-1)?.seq);
    expect(page.more).toBe(false);
    const other = await pull(fixture, tokens.operator2);
    expect(other.records.map((r) => r.id)).toEqual([
      sent.otherRound.id,
      sent.op2Note.id,
      sent.op2Ack.id,
      sent.mechNoteElsewhere.id,
      sent.reviewOther.id,
    ]);
  });

  it('should give a mechanic maintenance records and lockout acknowledgements of everyone plus their own', async () => {
    const { fixture, sent, tokens } = await populated();
    const page = await pull(fixture, tokens.mechanic);
    expect(page.records.map((r) => r.id)).toEqual([
      sent.op2Ack.id,
      sent.mechAck.id,
      sent.mechValve.id,
      sent.mechNoteOnRound.id,
      sent.mechNoteElsewhere.id,
    ]);
  });

  it('should page with next and more, so following next visits every record once', async () => {
    const { fixture, tokens } = await populated();
    const everything = (await pull(fixture, tokens.supervisor)).records.map((r) => r.id);
    const { pages, ids } = await pullAll(fixture, tokens.supervisor, 3);
    expect(ids).toEqual(everything);
    expect(pages.map((page) => page.records.length)).toEqual([3, 3, 3, 2]);
    expect(pages.map((page) => page.more)).toEqual([true, true, true, false]);
    // A page past the end is empty, not an error, and keeps the cursor.
    const end = await pull(fixture, tokens.supervisor, `?after=${pages.at(-1)?.next}`);
    expect(end).toEqual({ records: [], next: pages.at(-1)?.next, more: false });
  });

  it("should advance an operator's cursor over unreadable records page by page", async () => {
    const { fixture, sent, tokens } = await populated();
    const { pages, ids } = await pullAll(fixture, tokens.operator, 2);
    expect(ids).toEqual([sent.round.id, sent.opNote.id, sent.mechNoteOnRound.id, sent.review.id]);
    const last = pages.at(-1);
    const all = await pull(fixture, tokens.supervisor);
    expect(last?.next).toBe(all.records.at(-1)?.seq);
    // New records arrive after the cursor: a later pull starts exactly there.
    const more = note('operator');
    await push(fixture.app, tokens.operator, [more]);
    const next = await pull(fixture, tokens.operator, `?after=${last?.next}`);
    expect(next.records.map((r) => r.id)).toEqual([more.id]);
  });

  it('should default to 500 records per page and allow at most 1000', async () => {
    const fixture = await makeApi();
    api = fixture;
    const token = await signIn(fixture.app, 'operator');
    for (let batch = 0; batch < 3; batch += 1) {
      await push(
        fixture.app,
        token,
        Array.from({ length: 400 }, () => note('operator', { text: 'n' })),
      );
    }
    const first = await pull(fixture, token);
    expect(first.records).toHaveLength(500);
    expect(first.more).toBe(true);
    const big = await pull(fixture, token, '?limit=1000');
    expect(big.records).toHaveLength(1000);
    expect(big.more).toBe(true);
    const rest = await pull(fixture, token, `?after=${big.next}&limit=1000`);
    expect(rest.records).toHaveLength(200);
    expect(rest.more).toBe(false);
  });

  it.each([
    '?limit=1001',
    '?limit=0',
    '?limit=-1',
    '?after=abc',
    '?after=1.5',
    '?after=1e3',
    '?after=1&after=2',
    '?since=4',
    '?after=99999999999999999',
  ])('should answer 400 for %s', async (query) => {
    const fixture = await makeApi();
    api = fixture;
    const token = await signIn(fixture.app, 'operator');
    const res = await call(fixture.app, 'GET', `/api/v1/records${query}`, { token });
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('E_VALIDATION');
  });

  it('should answer 401 without a token', async () => {
    const fixture = await makeApi();
    api = fixture;
    expect((await call(fixture.app, 'GET', '/api/v1/records')).status).toBe(401);
  });
});
