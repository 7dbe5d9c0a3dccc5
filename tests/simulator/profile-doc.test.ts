import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseProfile } from '../../simulator/profile';
import { demoProfile } from './fixtures';

const doc = readFileSync(new URL('../../docs/simulation-profile.md', import.meta.url), 'utf8');

/** Every field path of a parsed profile (defaults filled in), arrays as `name[]`. */
function paths(v: unknown, prefix = ''): string[] {
  if (Array.isArray(v)) {
    const first = v[0];
    return first !== null && typeof first === 'object' ? paths(first, `${prefix}[]`) : [];
  }
  if (v === null || typeof v !== 'object') return [];
  return Object.entries(v).flatMap(([k, x]) => {
    const p = prefix ? `${prefix}.${k}` : k;
    return [p, ...paths(x, p)];
  });
}

describe('docs/simulation-profile.md', () => {
  it('documents every field of the profile', () => {
    const all = paths(parseProfile(demoProfile()));
    expect(all.length).toBeGreaterThan(40);
    // Issue 5 part 2: "document the format": every field appears as `path` in the document.
    const missing = all.filter((p) => !doc.includes(`\`${p}\``));
    expect(missing).toEqual([]);
  });
});
