import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { currentPerson } from '../../../src/app/models/person';
import { openStore } from '../../../src/store';
import { SESSION_KEY } from '../../../src/sync';

describe('currentPerson', () => {
  it('should be the person signed in on the tablet, and nobody before a sign-in', async () => {
    const store = await openStore({ name: `person-${Math.random().toString(36).slice(2)}` });
    expect(await currentPerson(store)).toBeNull();
    await store.setMeta(SESSION_KEY, {
      token: 'x'.repeat(43),
      user: { id: 'operator', name: 'Mara Oyelaran', roles: ['operator'] },
      device: { id: 'tablet', name: 'Tablet' },
      signedInAt: '2026-03-01T05:00:00Z',
    });
    expect(await currentPerson(store)).toEqual({ id: 'operator', name: 'Mara Oyelaran' });
    store.close();
  });
});
