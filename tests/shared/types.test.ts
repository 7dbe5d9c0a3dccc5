import { describe, expect, it } from 'vitest';
import { ShapeError } from '../../shared/types';

describe('typed errors', () => {
  // Common practice (STYLE.md §3): a shape error names the field and what was expected.
  it('names the field in the message of a shape error', () => {
    const err = new ShapeError('state', 'expected [64][4][2], got [64][3][2]');
    expect(err.message).toBe('state: expected [64][4][2], got [64][3][2]');
    expect(err.field).toBe('state');
  });
});
