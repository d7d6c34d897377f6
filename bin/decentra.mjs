#!/usr/bin/env node
// The decentra command. Runs the bundle built at install time (npm ci runs "prepare").
import { existsSync } from 'node:fs';
import { pathToFileURL, fileURLToPath } from 'node:url';
const bundle = fileURLToPath(new URL('../dist-cli/decentra.mjs', import.meta.url));
if (!existsSync(bundle)) {
  process.stderr.write('decentra: the command is not built yet; run "npm run build:cli" (npm ci does it)\n');
  process.exit(2);
}
const { runAsync } = await import(bundle);
const r = await runAsync(process.argv.slice(2), pathToFileURL(bundle));
if (r.out) process.stdout.write(r.out.endsWith('\n') ? r.out : `${r.out}\n`);
if (r.err) process.stderr.write(`${r.err}\n`);
process.exitCode = r.code;
