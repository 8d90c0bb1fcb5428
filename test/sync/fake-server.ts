/**
 * A small in-memory stand-in for the site server's sync API, faithful to the wire contract, for testing the tablet's
 * push and pull without HTTP. Records are kept by id with their content hash; sequence numbers count up.
 */
import { createHash } from 'node:crypto';
import { parseEnvelope, RecordError, type SiteConfig, type TypedEnvelope } from '../../src/schema';
import type { SyncApi } from '../../src/sync';
import { SyncError } from '../../src/sync';

const canonical = (value: unknown): string => {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value && typeof value === 'object') {
    return `{${Object.keys(value)
      .sort()
      .filter((k) => (value as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonical((value as Record<string, unknown>)[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(value);
};

export const hashOf = (envelope: TypedEnvelope) => {
  const { id: _id, ...content } = envelope;
  return createHash('sha256').update(canonical(content)).digest('hex');
};

export class FakeServer {
  readonly records = new Map<string, { seq: number; envelope: TypedEnvelope; hash: string }>();
  readonly conflicts: TypedEnvelope[] = [];
  private seq = 0;
  pushes = 0;
  constructor(public config: SiteConfig) {}

  /** Stores a batch exactly as the contract says (stored / duplicate / conflict / rejected, in order). */
  ingest(records: unknown[]) {
    this.pushes += 1;
    return {
      results: records.map((raw) => {
        let envelope: TypedEnvelope;
        try {
          envelope = parseEnvelope(raw);
        } catch (error) {
          const id = typeof (raw as { id?: unknown })?.id === 'string' ? (raw as { id: string }).id : '';
          return {
            id,
            status: 'rejected' as const,
            error: error instanceof RecordError ? error.message : String(error),
          };
        }
        const existing = this.records.get(envelope.id);
        const hash = hashOf(envelope);
        if (existing) {
          if (existing.hash === hash) return { id: envelope.id, status: 'duplicate' as const, seq: existing.seq };
          this.conflicts.push(envelope);
          return { id: envelope.id, status: 'conflict' as const, error: 'different content' };
        }
        this.seq += 1;
        this.records.set(envelope.id, { seq: this.seq, envelope, hash });
        return { id: envelope.id, status: 'stored' as const, seq: this.seq };
      }),
    };
  }

  api(options: { deviceId?: string; faults?: Faults } = {}): SyncApi {
    const faults = options.faults;
    const maybeFail = async <T>(work: () => T): Promise<T> => {
      if (faults && faults.random() < faults.dropRequest) throw new SyncError('network', 'request dropped');
      const result = work();
      if (faults && faults.random() < faults.duplicate) work();
      if (faults && faults.random() < faults.dropResponse)
        throw new SyncError('network', 'response dropped after commit');
      return result;
    };
    return {
      signIn: async () => ({ token: 'x'.repeat(43), user: { id: 'operator', name: 'Op', roles: ['operator'] } }),
      signOut: async () => {},
      push: (envelopes) => maybeFail(() => this.ingest(envelopes)),
      pull: (after, limit) =>
        maybeFail(() => {
          const all = [...this.records.values()].sort((a, b) => a.seq - b.seq).filter((r) => r.seq > after);
          const page = all.slice(0, limit);
          return {
            records: page.map((r) => ({ seq: r.seq, ...r.envelope })),
            next: page.at(-1)?.seq ?? after,
            more: all.length > limit,
          };
        }),
      config: () => maybeFail(() => this.config),
    };
  }
}

export interface Faults {
  random: () => number;
  dropRequest: number;
  dropResponse: number;
  duplicate: number;
}
