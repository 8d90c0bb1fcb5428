import { describe, expect, it } from 'vitest';
import { isSkipWaitingMessage } from '../../src/sw/messages';

describe('isSkipWaitingMessage', () => {
  // source: workbox-window 7 `messageSkipWaiting()` posts { type: 'SKIP_WAITING' } to the waiting worker
  it('should accept only the skip-waiting message', () => {
    expect(isSkipWaitingMessage({ type: 'SKIP_WAITING' })).toBe(true);
    expect(isSkipWaitingMessage({ type: 'GET_VERSION' })).toBe(false);
    expect(isSkipWaitingMessage('SKIP_WAITING')).toBe(false);
    expect(isSkipWaitingMessage(null)).toBe(false);
  });
});
