import { describe, expect, it } from 'vitest';
import { personIdFrom } from '../../../src/app/models/person';

describe('personIdFrom', () => {
  it('should make a stable, readable id from a name', () => {
    expect(personIdFrom('Mara Oyelaran')).toBe('mara-oyelaran');
    // source: Unicode NFKD decomposition separates base letters from combining accents (Unicode Standard Annex #15)
    expect(personIdFrom('Tomás Lindqvist')).toBe('tomas-lindqvist');
    expect(personIdFrom('  ***  ')).toBe('person');
  });
});
