import { describe, expect, it } from 'vitest';
import { assertChromiumInstalled, CHROMIUM_INSTALL_HINT } from '../support/chromium';

describe('assertChromiumInstalled', () => {
  it('should fail with the install command when Chromium is missing, never skip', () => {
    expect(() => assertChromiumInstalled('/nonexistent/chromium')).toThrow(CHROMIUM_INSTALL_HINT);
    expect(CHROMIUM_INSTALL_HINT).toBe('sudo apt-get update && sudo apt-get install -y chromium');
  });
});
