/**
 * Every page but the sign-in page checks the session against the database on each render
 * (requirePagePrincipal), so a client-side navigation after the session ended elsewhere gets no data.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const appDir = path.join(__dirname, '..', '..', '..', 'src', 'app');

function pages(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return name === 'api' ? [] : pages(full);
    return name === 'page.tsx' ? [full] : [];
  });
}

describe('pages need a signed-in person', () => {
  const all = pages(appDir);
  it('finds the pages', () => {
    expect(all.length).toBeGreaterThan(10);
  });
  for (const file of all) {
    const rel = path.relative(appDir, file);
    if (rel === path.join('login', 'page.tsx')) continue;
    it(`${rel} calls requirePagePrincipal() before anything else`, () => {
      const text = readFileSync(file, 'utf8');
      const body = text.slice(text.indexOf('export default async function'));
      expect(body.length, 'the page must be an async server component').toBeLessThan(text.length);
      const firstStatement = body.slice(body.indexOf('{\n') + 2).trimStart();
      expect(firstStatement.startsWith('await requirePagePrincipal();')).toBe(true);
    });
  }
});
