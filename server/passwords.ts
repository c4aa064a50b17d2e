import { dictionary } from '@zxcvbn-ts/language-common';

/**
 * The ~49,000 most common passwords from leaked-password lists, as shipped by zxcvbn-ts.
 * NIST SP 800-63B asks that new passwords be checked against such a list.
 */
const COMMON_PASSWORDS = new Set((dictionary['passwords-common'] as string[]).map((p) => p.toLowerCase()));

export function isCommonPassword(password: string): boolean {
  return COMMON_PASSWORDS.has(password.toLowerCase());
}
