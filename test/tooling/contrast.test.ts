import { describe, expect, it } from 'vitest';
import { contrastRatio } from '../support/contrast';

describe('contrastRatio', () => {
  // source: WCAG 2.2 "contrast ratio" definition: ratios range from 1:1 to 21:1
  it('should give 21 for black on white and 1 for equal colours', () => {
    expect(contrastRatio('rgb(0, 0, 0)', 'rgb(255, 255, 255)')).toBeCloseTo(21, 6);
    expect(contrastRatio('rgb(119, 119, 119)', 'rgb(119, 119, 119)')).toBe(1);
  });

  // source: WebAIM contrast checker, #777777 on #FFFFFF = 4.48:1 (from memory; it matches the WCAG formula above)
  it('should match a published reference pair', () => {
    expect(contrastRatio('rgb(119, 119, 119)', 'rgb(255, 255, 255)')).toBeCloseTo(4.48, 2);
  });
});
