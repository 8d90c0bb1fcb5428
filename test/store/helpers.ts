/** Shared pieces of the store's unit tests (fake-indexeddb in Node). */
import type { SiteConfig } from '../../src/schema';
import { type OpenStoreOptions, openStore, type Store } from '../../src/store';
import { FIXTURE_DEVICE, OPERATOR } from '../support/store-fixture';

let counter = 0;

/** A database name no other test uses. */
export function freshName(): string {
  counter += 1;
  return `crankhouse-test-${process.pid}-${counter}-${Math.random().toString(36).slice(2)}`;
}

export async function freshStore(options: OpenStoreOptions = {}): Promise<Store> {
  return openStore({ name: freshName(), ...options });
}

export const META = { author: OPERATOR.id, device: FIXTURE_DEVICE, createdAt: '2026-03-02T10:00:00Z' };

/** Catches what the promise rejects with; fails the test if it resolves. */
export async function rejection(promise: Promise<unknown>): Promise<Error & { code?: string }> {
  try {
    await promise;
  } catch (error) {
    return error as Error & { code?: string };
  }
  throw new Error('expected the call to fail, but it succeeded');
}

/** A small, complete site configuration (one machine, one route) that the schema accepts. */
export function siteConfig(version = 1): SiteConfig {
  return {
    version,
    name: 'Fixture site',
    publishedAt: '2026-02-01T00:00:00Z',
    barometer: { kind: 'elevation', elevationM: 300 },
    units: { system: 'SI', overrides: {} },
    gasStreams: [
      { id: 'G-1', name: 'Sales gas', composition: { methane: 0.95, ethane: 0.05 }, standardBasis: 'Sm3-15C' },
    ],
    machines: [
      {
        id: 'K-101',
        name: 'Compressor K-101',
        service: '',
        frame: {
          strokeM: 0.14,
          connectingRodM: 0.35,
          ratedSpeedRpm: 1000,
          ratedCompressionN: 200_000,
          ratedTensionN: 180_000,
          throws: [{ index: 1, reciprocatingMassKg: 110 }],
        },
        stages: [{ id: 'S1', index: 1, gasStreamId: 'G-1', veMethod: 'empirical' }],
        cylinders: [
          {
            id: 'C1',
            stageId: 'S1',
            throw: 1,
            boreM: 0.25,
            rodM: 0.06,
            headClearance: 0.16,
            crankClearance: 0.19,
            headActive: true,
            crankActive: true,
          },
        ],
        valvePositions: [{ id: 'C1-HE-S1', cylinderId: 'C1', end: 'head', service: 'suction', index: 1 }],
        bearings: [],
        lubeOilPoints: [],
      },
    ],
    routes: [
      {
        id: 'R-1',
        name: 'Morning round',
        points: [
          {
            id: 'PT-001',
            label: 'Stage 1 suction',
            kind: 'pressure',
            role: 'suctionPressure',
            machineId: 'K-101',
            unit: 'barg',
          },
        ],
      },
    ],
    cautionSets: [],
  };
}

/** Fails with `what` if the promise has not settled after `ms`: a guard against hangs, not a speed check. */
export async function within<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not happen within ${ms} ms`)), ms);
  });
  try {
    return await Promise.race([promise, timeout]);
  } finally {
    clearTimeout(timer);
  }
}
