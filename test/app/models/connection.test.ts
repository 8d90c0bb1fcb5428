import { describe, expect, it } from 'vitest';
import { describeConnection, INITIAL_CONNECTION, nextConnectionState } from '../../../src/app/models/connection';

const up = { reachable: true as const, checkedAt: 1_000, serverVersion: '0.1.0', database: 'ok' as const };
const down = { reachable: false as const, checkedAt: 61_000, reason: 'network' as const, detail: 'Failed to fetch' };

describe('nextConnectionState', () => {
  it('should become reachable after a successful probe and remember when', () => {
    const state = nextConnectionState(INITIAL_CONNECTION, { kind: 'probe', result: up });
    expect(state).toEqual({ status: 'reachable', lastReachableAt: 1_000, lastProbe: up });
  });

  it('should keep the last reachable time when the server goes away', () => {
    const reachable = nextConnectionState(INITIAL_CONNECTION, { kind: 'probe', result: up });
    const lost = nextConnectionState(reachable, { kind: 'probe', result: down });
    expect(lost.status).toBe('unreachable');
    expect(lost.lastReachableAt).toBe(1_000);
  });

  it('should not flicker back to checking once a probe has answered', () => {
    const reachable = nextConnectionState(INITIAL_CONNECTION, { kind: 'probe', result: up });
    expect(nextConnectionState(reachable, { kind: 'checking' })).toBe(reachable);
  });

  it('should say no network when the browser has no network interface', () => {
    expect(nextConnectionState(INITIAL_CONNECTION, { kind: 'no-network' }).status).toBe('no-network');
  });
});

describe('describeConnection', () => {
  it('should tell the operator that readings stay on the tablet while the server is away', () => {
    const lost = nextConnectionState(nextConnectionState(INITIAL_CONNECTION, { kind: 'probe', result: up }), {
      kind: 'probe',
      result: down,
    });
    expect(describeConnection(lost, 121_000)).toEqual({
      label: 'Server not reachable',
      detail: 'Working offline: readings stay on this tablet (last reached 2 min ago).',
    });
  });

  it('should flag a server whose database is unavailable', () => {
    const sick = nextConnectionState(INITIAL_CONNECTION, {
      kind: 'probe',
      result: { ...up, database: 'unavailable' },
    });
    expect(describeConnection(sick, 2_000).label).toBe('Server: storage fault');
  });

  it('should name the server version when reachable', () => {
    const reachable = nextConnectionState(INITIAL_CONNECTION, { kind: 'probe', result: up });
    expect(describeConnection(reachable, 2_000)).toEqual({
      label: 'Server reachable',
      detail: 'Site server version 0.1.0 answers.',
    });
  });
});
