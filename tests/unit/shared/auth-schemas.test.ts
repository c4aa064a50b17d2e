import { describe, expect, it } from 'vitest';
import { signInInputSchema, signUpInputSchema } from '@/shared/schemas/auth';
import { updateCollectionInputSchema } from '@/shared/schemas/collections';
import { isCommonPassword } from '../../../server/passwords';

describe('sign-up input', () => {
  it('normalizes the e-mail address to trimmed lower case', () => {
    const parsed = signUpInputSchema.parse({ email: '  Grower@Example.TEST ', password: 'long-enough-pass', displayName: ' Ana ' });
    expect(parsed.email).toBe('grower@example.test');
    expect(parsed.displayName).toBe('Ana');
  });

  it.each([
    [{ email: 'a@b', password: 'long-enough-pass', displayName: 'A' }, 'email'],
    [{ email: 'a@example.test', password: '123456789', displayName: 'A' }, 'password'],
    [{ email: 'a@example.test', password: 'x'.repeat(201), displayName: 'A' }, 'password'],
    [{ email: 'a@example.test', password: 'long-enough-pass', displayName: '' }, 'displayName'],
    [{ email: 'a@example.test', password: 'long-enough-pass' }, 'displayName'],
  ])('refuses %o on %s', (input, field) => {
    const result = signUpInputSchema.safeParse(input);
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((i) => i.path.join('.'))).toContain(field);
  });

  it('sign-in takes any non-empty password (old accounts may predate the rules)', () => {
    expect(signInInputSchema.safeParse({ email: 'a@example.test', password: 'short' }).success).toBe(true);
    expect(signInInputSchema.safeParse({ email: 'a@example.test', password: '' }).success).toBe(false);
  });
});

describe('common passwords', () => {
  it.each(['password', 'Password', '1234567890', 'qwertyuiop'])('%s is on the list', (p) => {
    expect(isCommonPassword(p)).toBe(true);
  });
  it('a long invented phrase is not', () => {
    expect(isCommonPassword('pseudobulb-ladder-77')).toBe(false);
  });
});

describe('collection settings input', () => {
  it('accepts a partial change', () => {
    expect(updateCollectionInputSchema.parse({ units: 'in' })).toEqual({ units: 'in' });
  });
  it('refuses an empty change', () => {
    expect(updateCollectionInputSchema.safeParse({}).success).toBe(false);
  });
  it('allows clearing the location', () => {
    expect(updateCollectionInputSchema.parse({ latitude: null, longitude: null })).toEqual({ latitude: null, longitude: null });
  });
});
