import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// The domain code must stay pure: no I/O, no clock, no randomness, no React, no database, and
// imports only of its own modules and the two numeric libraries.
const DOMAIN_DIR = join(dirname(fileURLToPath(import.meta.url)), '..', '..', '..', 'src', 'domain');
const ALLOWED_PACKAGES = new Set(['simple-statistics', 'ml-levenberg-marquardt']);
const files = readdirSync(DOMAIN_DIR).filter((f) => f.endsWith('.ts'));

describe('src/domain boundary', () => {
  it('has files to check', () => {
    expect(files.length).toBeGreaterThan(5);
  });

  it.each(files)('%s imports only domain modules and the numeric libraries', (file) => {
    const source = readFileSync(join(DOMAIN_DIR, file), 'utf8');
    const specifiers = [...source.matchAll(/(?:import|export)[^'"]*?from\s+['"]([^'"]+)['"]/g)].map((m) => m[1]);
    for (const s of specifiers) {
      const ok = (s.startsWith('./') && !s.includes('..')) || ALLOWED_PACKAGES.has(s);
      expect(ok, `${file} imports ${s}`).toBe(true);
    }
  });

  it.each(files)('%s reads no clock, randomness or environment', (file) => {
    const source = readFileSync(join(DOMAIN_DIR, file), 'utf8');
    expect(source).not.toMatch(/\bnew Date\(|Date\.now\(|Math\.random\(|\bprocess\.|\brequire\(/);
  });
});
