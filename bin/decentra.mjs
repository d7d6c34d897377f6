#!/usr/bin/env node
// The decentra command. Runs the bundle built at install time (npm ci runs "prepare").
// runCli (src/cli/entry.ts) writes the output and the one-line errors and gives the status.
import { existsSync } from 'node:fs';
import { pathToFileURL, fileURLToPath } from 'node:url';
const bundle = fileURLToPath(new URL('../dist-cli/decentra.mjs', import.meta.url));
if (!existsSync(bundle)) {
  process.stderr.write('decentra: the command is not built yet; run "npm run build:cli" (npm ci does it)\n');
  process.exit(2);
}
const { runCli } = await import(bundle);
process.exitCode = await runCli(process.argv.slice(2), pathToFileURL(bundle));
