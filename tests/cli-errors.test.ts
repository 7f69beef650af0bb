import { describe, expect, it } from 'vitest';
import { EXIT_INPUT, EXIT_USAGE, InputError, UsageError, exitCodeFor, oneLine } from '../src/cli/errors.js';

// Exit statuses are our own documented contract (README "Exit statuses"); common practice for CLIs.
describe('exitCodeFor()', () => {
  it('maps usage errors and library range errors to 2', () => {
    expect(exitCodeFor(new UsageError('x'))).toBe(EXIT_USAGE);
    expect(exitCodeFor(new RangeError('x'))).toBe(EXIT_USAGE);
  });
  it('maps input errors to 3 and names the file', () => {
    const error = new InputError('a.png', 'not an image');
    expect(exitCodeFor(error)).toBe(EXIT_INPUT);
    expect(error.message).toBe('a.png: not an image');
  });
  it('oneLine() folds a multi-line message into one line', () => {
    expect(oneLine(new Error('a\n  b'))).toBe('a b');
  });
});
