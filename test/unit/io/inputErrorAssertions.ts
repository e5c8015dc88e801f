import { expect } from "vitest";
import { InputError, type InputLocation } from "../../../src/errors.js";

export interface ExpectedInputError extends InputLocation {
  /** Every pattern must occur in the message. */
  message?: (string | RegExp)[];
  hint?: string | RegExp;
}

/**
 * Runs `action`, requires it to throw an InputError whose location fields equal
 * `expected` (fields not given must be absent), and checks that `format()` — the
 * text the CLI prints — names the file, line and column (as file:line:column) or the key.
 */
export function expectInputError(action: () => unknown, expected: ExpectedInputError): InputError {
  let thrown: unknown;
  try {
    action();
  } catch (error) {
    thrown = error;
  }
  if (!(thrown instanceof InputError)) {
    throw new Error(`expected an InputError, got ${thrown === undefined ? "no error" : String((thrown as Error)?.stack ?? thrown)}`);
  }
  const { message = [], hint, ...location } = expected;
  expect(thrown.location, thrown.format()).toEqual(location);
  for (const pattern of message) expect(thrown.message).toMatch(pattern);
  if (hint !== undefined) expect(thrown.hint ?? "").toMatch(hint);

  const formatted = thrown.format();
  if (location.file !== undefined) {
    let place = location.file;
    if (location.line !== undefined) place += `:${location.line}`;
    if (location.column !== undefined) place += `:${location.column}`;
    expect(formatted).toContain(place);
  }
  if (location.key !== undefined) expect(formatted).toContain(`'${location.key}'`);
  expect(formatted).not.toMatch(/\n\s+at /); // no stack trace
  return thrown;
}

/** For property tests: true for a normal return, true for an InputError, rethrows anything else. */
export function parsesOrInputError(action: () => unknown): boolean {
  try {
    action();
  } catch (error) {
    if (error instanceof InputError) return true;
    throw error;
  }
  return true;
}

/** For property tests: the result, or undefined if `action` raised an InputError; anything else is rethrown. */
export function resultOrInputError<T>(action: () => T): T | undefined {
  try {
    return action();
  } catch (error) {
    if (error instanceof InputError) return undefined;
    throw error;
  }
}
