/**
 * The engine is pure (DEVELOPERS.md, "Layout" and "The engine is pure"): src/optics imports
 * nothing from three, lil-gui or the DOM. Allowed: sibling engine modules, and mathjs
 * (DEVELOPERS.md, "Toolchain choices": it earns its place off the hot path, for units and
 * matrix work).
 */
import { describe, expect, test } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';

const dir = join(import.meta.dirname, '../../src/optics');
const files = readdirSync(dir).filter((f) => f.endsWith('.ts'));

/** The source with comments and string/template contents removed (so prose cannot trip the scan). */
function code(src: string): string {
  return src
    .replace(/\/\*[\s\S]*?\*\//g, '')
    .replace(/(^|[^:])\/\/.*$/gm, '$1')
    .replace(/`(?:\\.|[^`\\])*`/g, '``')
    .replace(/'(?:\\.|[^'\\])*'/g, "''")
    .replace(/"(?:\\.|[^"\\])*"/g, '""');
}

/** Module specifiers of import/export-from statements and dynamic imports. */
function specifiers(src: string): string[] {
  const out: string[] = [];
  const re = /(?:^|\n)\s*(?:import|export)\b[^;]*?\bfrom\s*['"]([^'"]+)['"]|(?:^|\n)\s*import\s*['"]([^'"]+)['"]|\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)|\brequire\s*\(\s*['"]([^'"]+)['"]\s*\)/g;
  for (const m of src.matchAll(re)) out.push((m[1] ?? m[2] ?? m[3] ?? m[4])!);
  return out;
}

describe('src/optics is pure', () => {
  test('there are engine files to scan', () => {
    expect(files.length).toBeGreaterThanOrEqual(10);
    expect(files).toContain('surface.ts');
  });

  test.each(files)('%s imports only sibling engine modules (or mathjs)', (f) => {
    const src = readFileSync(join(dir, f), 'utf8');
    for (const s of specifiers(src)) {
      expect(s, `${f} imports '${s}'`).toMatch(/^(\.\/[\w-]+\.ts|mathjs(\/[\w/-]+)?)$/);
      expect(s).not.toMatch(/three|lil-gui/);
    }
  });

  test.each(files)('%s uses no DOM or browser globals', (f) => {
    const body = code(readFileSync(join(dir, f), 'utf8'));
    for (const g of ['window', 'document', 'navigator', 'HTMLElement', 'requestAnimationFrame', 'localStorage', 'THREE', 'GUI']) {
      expect(body, `${f} mentions ${g}`).not.toMatch(new RegExp(`\\b${g}\\b`));
    }
  });

  test('the scan can fail: it spots a three import and a DOM global in a sample', () => {
    expect(specifiers("import * as THREE from 'three';\nimport { x } from './a.ts';")).toEqual(['three', './a.ts']);
    expect(specifiers("export { GUI } from 'lil-gui';")).toEqual(['lil-gui']);
    expect(code('const w = window.innerWidth; // document')).toMatch(/\bwindow\b/);
    expect(code('/* window */ const a = 1;')).not.toMatch(/\bwindow\b/);
  });
});
