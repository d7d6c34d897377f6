// Runs every test: type-check, vitest (unit, reference, property) and, when present, the
// Playwright browser suite; prints one "N passed, N failed" line and exits non-zero on failure.
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, mkdirSync } from 'node:fs';

const run = (cmd, args, env = {}) =>
  spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } }).status ?? 1;

let passed = 0, failed = 0, ok = true;
mkdirSync('test-results', { recursive: true });

if (run('npm', ['run', '--silent', 'typecheck']) !== 0) {
  ok = false;
  failed += 1;
  console.error('type-check failed');
}

// the generated tables in docs/prentice-error.md must match the engine as it is now
if (run('npx', ['tsx', 'scripts/error-table.ts', '--check']) === 0) passed += 1;
else {
  failed += 1;
  console.error('docs/prentice-error.md is out of date: run npx tsx scripts/error-table.ts');
}

const vitestJson = 'test-results/vitest.json';
const v = run('npx', ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${vitestJson}`]);
if (existsSync(vitestJson)) {
  const r = JSON.parse(readFileSync(vitestJson, 'utf8'));
  passed += r.numPassedTests ?? 0;
  failed += (r.numFailedTests ?? 0);
  if ((r.numTotalTests ?? 0) === 0) ok = false;
}
if (v !== 0) ok = false;

const hasE2e = existsSync('tests/e2e') && readdirSync('tests/e2e').some((f) => f.endsWith('.e2e.ts'));
if (hasE2e && process.env.DECENTRA_SKIP_E2E !== '1') {
  const pwJson = 'test-results/playwright.json';
  const p = run('npx', ['playwright', 'test', '--reporter=list,json'], { PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson });
  if (existsSync(pwJson)) {
    const s = JSON.parse(readFileSync(pwJson, 'utf8')).stats ?? {};
    passed += (s.expected ?? 0) + (s.flaky ?? 0);
    failed += (s.unexpected ?? 0);
  }
  if (p !== 0) ok = false;
}

console.log(`\n${passed} passed, ${failed} failed`);
process.exit(ok && failed === 0 ? 0 : 1);
