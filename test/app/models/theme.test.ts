import { describe, expect, it } from 'vitest';
import { loadTheme, parseTheme, THEMES } from '../../../src/app/models/theme';

describe('parseTheme', () => {
  it('should accept the three themes and fall back to auto for anything else', () => {
    for (const theme of THEMES) expect(parseTheme(theme)).toBe(theme);
    expect(parseTheme(null)).toBe('auto');
    expect(parseTheme('neon')).toBe('auto');
  });

  it('should fall back to auto when storage cannot be read', () => {
    const broken = {
      getItem(): string | null {
        throw new Error('SecurityError');
      },
    };
    expect(loadTheme(broken)).toBe('auto');
  });
});
