/**
 * A deterministic data set for the store's migration and crash tests, in the shapes version 1 of the store wrote.
 * It runs in Node and in the page (it is bundled by store-bundle.ts), so it uses no Node modules.
 * The content is arbitrary but schema-valid: these tests check that values survive unchanged, not what they mean.
 */
import { envelopeFor, type Finding, type Reading, type Round } from '../../src/schema';
import { type OutboxEntry, openDb, type StoredRecord } from '../../src/store/db';

/** A version-4-shaped UUID from two counters, so every run makes the same ids. */
export function fixtureId(kind: number, n: number): string {
  const hex = (value: number, width: number) => value.toString(16).padStart(width, '0');
  return `${hex(kind, 8)}-0000-4000-8000-${hex(n, 12)}`;
}

export const FIXTURE_DEVICE = 'dev-fixture';
export const OPERATOR = { id: 'op-1', name: 'Operator One' };
export const MECHANIC = { id: 'mech-1', name: 'Mechanic One' };
const BASE_MS = Date.parse('2026-03-01T06:00:00Z');
const at = (ms: number) => new Date(BASE_MS + ms).toISOString();
const HOUR = 3_600_000;

export const pointIdOf = (index: number) => `PT-${String(index + 1).padStart(3, '0')}`;

export function fixtureRound(index: number, state: 'draft' | 'finished' = 'draft'): Round {
  const startedAt = at(index * 8 * HOUR);
  return {
    id: fixtureId(1, index),
    siteName: 'Fixture site',
    routeId: index % 2 === 0 ? 'R-1' : 'R-2',
    configVersion: 1,
    by: OPERATOR,
    deviceId: FIXTURE_DEVICE,
    startedAt,
    finishedAt: state === 'finished' ? at(index * 8 * HOUR + HOUR) : null,
    state,
  };
}

/** Reading `point` of round `round`: pressures and temperatures alternate, every 15th point is skipped. */
export function fixtureReading(round: number, point: number, serial = point): Reading {
  const base = { id: fixtureId(2, round * 10_000 + serial), roundId: fixtureId(1, round), pointId: pointIdOf(point) };
  const when = at(round * 8 * HOUR + point * 20_000);
  if (point % 15 === 14)
    return { ...base, at: when, entered: null, valueSI: null, skipped: { reason: 'gauge fogged' } };
  if (point % 2 === 0) {
    const bar = 10 + ((round + point) % 7) / 10;
    return { ...base, at: when, entered: { text: bar.toFixed(1), unit: 'barg' }, valueSI: bar * 1e5 + 101_325 };
  }
  const celsius = 60 + ((round * 3 + point) % 11);
  return {
    ...base,
    at: when,
    entered: { text: String(celsius), unit: 'degC' },
    valueSI: celsius + 273.15,
    note: 'steady',
  };
}

export function fixtureFindings(round: number): Finding[] {
  const roundId = fixtureId(1, round);
  return [0, 2].map((point) => ({
    key: `${roundId}/limits/${pointIdOf(point)}`,
    roundId,
    rule: 'limits',
    subject: { machineId: 'K-101', pointId: pointIdOf(point) },
    severity: 'watch',
    message: `${pointIdOf(point)} is in its watch band`,
    numbers: { valueSI: 1_100_000 + point, highWatch: 1_000_000 },
    inputs: { pointId: pointIdOf(point) },
  }));
}

/** Record number `n` of six kinds in turn; valve changes and clearances point at the lockout ack made before them. */
export function fixtureRecord(n: number, round: number): StoredRecord {
  const id = fixtureId(3, n);
  const when = at(round * 8 * HOUR + 2 * HOUR + n * 60_000);
  const roundId = fixtureId(1, round);
  // The lockout acknowledgement made just before: record n - (n % 6) + 1 is always one.
  const ack = fixtureId(3, n - (n % 6) + 1);
  switch (n % 6) {
    case 0:
      return {
        id,
        type: 'note',
        body: { id, roundId, by: OPERATOR, at: when, text: `Note ${n}: oil level topped up` },
      };
    case 1:
      return {
        id,
        type: 'lockoutAck',
        body: {
          id,
          task: { kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-S1' },
          cautionSetId: 'CS-VALVE',
          configVersion: 1,
          by: MECHANIC,
          acknowledgements: [{ cautionId: 'C-1', at: when }],
          completedAt: when,
        },
      };
    case 2:
      return {
        id,
        type: 'valveChange',
        body: {
          id,
          machineId: 'K-101',
          valvePositionId: 'C1-HE-S1',
          at: when,
          by: MECHANIC,
          reason: 'failure',
          removedValveId: `V-${n}`,
          installedValveId: `V-${n + 1000}`,
          asFound: ['broken plate', 'debris'],
          partsFitted: ['plates', 'springs'],
          lockoutAckId: ack,
        },
      };
    case 3:
      return {
        id,
        type: 'rodDrop',
        body: {
          id,
          machineId: 'K-101',
          cylinderId: 'C1',
          at: when,
          by: MECHANIC,
          entered: { text: '0.25', unit: 'mm' },
          readingM: 0.00025,
          newBandReadingM: 0,
          wearM: 0.00025,
          usedFraction: 0.1,
        },
      };
    case 4:
      return {
        id,
        type: 'review',
        body: {
          id,
          findingKey: `${roundId}/limits/${pointIdOf(0)}`,
          roundId,
          by: { id: 'sup-1', name: 'Supervisor One' },
          disposition: 'monitor',
          comment: 'Watch it next round',
          at: when,
        },
      };
    default:
      return {
        id,
        type: 'bearingClearance',
        body: {
          id,
          machineId: 'K-101',
          bearingId: 'MB-1',
          at: when,
          by: MECHANIC,
          method: 'plastigage',
          measurements: [{ where: 'top', entered: { text: '0.15', unit: 'mm' }, valueM: 0.00015 }],
          spec: { minM: 0.0001, maxM: 0.0002 },
          result: { status: 'ok', perDiameter: 0.0015, message: 'within the range given' },
          lockoutAckId: ack,
        },
      };
  }
}

export interface StoreFixture {
  meta: Array<[string, unknown]>;
  rounds: Round[];
  readings: Reading[];
  findings: Finding[];
  records: StoredRecord[];
  /** In enqueue order, without seq (IndexedDB assigns it). */
  outbox: OutboxEntry[];
}

export interface FixtureSize {
  rounds?: number;
  /** The last `drafts` rounds stay drafts. */
  drafts?: number;
  readingsPerRound?: number;
  recordsPerRound?: number;
  /** The last `attention` outbox entries are parked as needing attention. */
  attention?: number;
}

export function makeFixture(size: FixtureSize = {}): StoreFixture {
  const { rounds = 20, drafts = 2, readingsPerRound = 60, recordsPerRound = 2, attention = 3 } = size;
  const fixture: StoreFixture = {
    meta: [
      ['deviceId', FIXTURE_DEVICE],
      ['firstSaveAt', at(0)],
    ],
    rounds: [],
    readings: [],
    findings: [],
    records: [],
    outbox: [],
  };
  let recordNumber = 0;
  for (let r = 0; r < rounds; r += 1) {
    const finished = r < rounds - drafts;
    const round = fixtureRound(r, finished ? 'finished' : 'draft');
    const readings = Array.from({ length: readingsPerRound }, (_, p) => fixtureReading(r, p));
    const findings = finished ? fixtureFindings(r) : [];
    fixture.rounds.push(round);
    fixture.readings.push(...readings);
    fixture.findings.push(...findings);
    if (round.finishedAt) {
      const envelope = envelopeFor(
        'round',
        { round, readings, findings },
        {
          author: OPERATOR.id,
          device: FIXTURE_DEVICE,
          createdAt: round.finishedAt,
        },
      );
      fixture.outbox.push({
        id: round.id,
        type: 'round',
        envelope,
        state: 'pending',
        attempts: 0,
        enqueuedAt: round.finishedAt,
      });
    }
    for (let k = 0; k < recordsPerRound; k += 1) {
      const record = fixtureRecord(recordNumber, r);
      recordNumber += 1;
      fixture.records.push(record);
      const createdAt = 'completedAt' in record.body ? record.body.completedAt : record.body.at;
      const envelope = envelopeFor(record.type, record.body as never, {
        author: OPERATOR.id,
        device: FIXTURE_DEVICE,
        createdAt,
      });
      fixture.outbox.push({
        id: record.id,
        type: record.type,
        envelope,
        state: 'pending',
        attempts: 0,
        enqueuedAt: createdAt,
      });
    }
  }
  for (const entry of fixture.outbox.slice(fixture.outbox.length - attention)) {
    entry.state = 'attention';
    entry.attempts = 2;
    entry.lastError = 'server refused: 422 body.text too long';
  }
  return fixture;
}

/** Builds a genuine version-1 database (created by the shipped v1 upgrade step) holding the fixture. */
export async function writeV1Database(name: string, fixture: StoreFixture): Promise<void> {
  const db = await openDb({ name, version: 1 });
  try {
    const tx = db.transaction(['meta', 'rounds', 'readings', 'findings', 'records', 'outbox'], 'readwrite', {
      durability: 'strict',
    });
    const writes: Array<Promise<unknown>> = [];
    for (const [key, value] of fixture.meta) writes.push(tx.objectStore('meta').put(value, key));
    for (const round of fixture.rounds) writes.push(tx.objectStore('rounds').add(round));
    for (const reading of fixture.readings) writes.push(tx.objectStore('readings').add(reading));
    for (const finding of fixture.findings) writes.push(tx.objectStore('findings').add(finding));
    for (const record of fixture.records) writes.push(tx.objectStore('records').add(record));
    for (const entry of fixture.outbox) writes.push(tx.objectStore('outbox').add(entry));
    await Promise.all([...writes, tx.done]);
  } finally {
    db.close();
  }
}

export interface DatabaseDump {
  version: number;
  stores: Record<string, Array<[IDBValidKey, unknown]>>;
  indexes: Record<string, string[]>;
}

/** Every key and value of every store, and the index names, read with plain IndexedDB calls. */
export async function dumpDatabase(name: string): Promise<DatabaseDump> {
  const db = await new Promise<IDBDatabase>((resolve, reject) => {
    const request = indexedDB.open(name);
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
    request.onupgradeneeded = () => {
      request.transaction?.abort();
      reject(new Error(`database ${name} does not exist`));
    };
  });
  try {
    const names = [...db.objectStoreNames];
    const dump: DatabaseDump = { version: db.version, stores: {}, indexes: {} };
    if (names.length === 0) return dump;
    const tx = db.transaction(names, 'readonly');
    await Promise.all(
      names.map(
        (storeName) =>
          new Promise<void>((resolve, reject) => {
            const store = tx.objectStore(storeName);
            dump.indexes[storeName] = [...store.indexNames].sort();
            const entries: Array<[IDBValidKey, unknown]> = [];
            const cursor = store.openCursor();
            cursor.onsuccess = () => {
              const current = cursor.result;
              if (!current) {
                dump.stores[storeName] = entries;
                resolve();
                return;
              }
              entries.push([current.primaryKey, current.value]);
              current.continue();
            };
            cursor.onerror = () => reject(cursor.error);
          }),
      ),
    );
    return dump;
  } finally {
    db.close();
  }
}
