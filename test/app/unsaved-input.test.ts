import { describe, expect, it } from 'vitest';
import { hasUnsavedInput, registerUnsavedInput } from '../../src/app/unsaved-input';

describe('registerUnsavedInput', () => {
  it('should report unsaved input while any registered form is dirty', () => {
    let dirty = false;
    const release = registerUnsavedInput('reading-entry', () => dirty);
    const releaseOther = registerUnsavedInput('note', () => false);
    expect(hasUnsavedInput()).toBe(false);
    dirty = true;
    expect(hasUnsavedInput()).toBe(true);
    release();
    expect(hasUnsavedInput()).toBe(false);
    releaseOther();
  });

  it('should not let a stale release remove a newer guard with the same id', () => {
    const releaseOld = registerUnsavedInput('entry', () => true);
    const releaseNew = registerUnsavedInput('entry', () => true);
    releaseOld();
    expect(hasUnsavedInput()).toBe(true);
    releaseNew();
    expect(hasUnsavedInput()).toBe(false);
  });
});
