import { describe, expect, it } from 'vitest';
import { identifiersIn, renameInExpression } from './rename.ts';

// Token-aware rename: hand-worked cases (common practice, no source).
describe('renameInExpression', () => {
  it('renames whole identifiers only', () => {
    expect(renameInExpression('Kp*(1 + 1/(Ti*s)) + Kp2', 'Kp', 'Kc')).toBe('Kc*(1 + 1/(Ti*s)) + Kp2');
  });
  it('leaves number exponents and function names alone', () => {
    expect(renameInExpression('1e5*e + exp(-e*s)', 'e', 'g')).toBe('1e5*g + exp(-g*s)');
    expect(renameInExpression('exp(-T*s)', 'exp', 'x')).toBe('exp(-T*s)');
  });
  it('lists identifiers, not functions or numbers', () => {
    expect(identifiersIn('2.5e-3*K*exp(-T*s)')).toEqual(['K', 'T', 's']);
  });
});
