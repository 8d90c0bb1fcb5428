import { expect } from 'vitest';
import { CalcError, type CalcErrorCode } from '../../src/calc';

/** Asserts that `run` throws a CalcError with this code and field, and a message that says what is allowed. */
export function expectCalcError(run: () => unknown, code: CalcErrorCode, field: string): CalcError {
  let caught: unknown;
  try {
    run();
  } catch (error) {
    caught = error;
  }
  expect(caught, `expected ${code} on ${field}`).toBeInstanceOf(CalcError);
  const error = caught as CalcError;
  expect({ code: error.code, field: error.field }).toEqual({ code, field });
  expect(error.message.length).toBeGreaterThan(20);
  return error;
}

/** Relative closeness, for worked examples quoted to four significant figures (tolerance 1e-3 unless stated). */
export function expectClose(actual: number, expected: number, relative = 1e-3): void {
  expect(Number.isFinite(actual), `${actual} is finite`).toBe(true);
  const scale = Math.max(Math.abs(expected), Number.MIN_VALUE);
  expect(Math.abs(actual - expected) / scale, `${actual} vs ${expected}`).toBeLessThanOrEqual(relative);
}

export const C_TO_K = (celsius: number) => celsius + 273.15;
export const K_TO_C = (kelvin: number) => kelvin - 273.15;
