/**
 * Child process of the end-to-end benchmark (bench/run.ts): runs one design file through the command
 * line's own code path (server/cli/run-design-file.ts) and prints one JSON line with the timings and the
 * process's peak resident set size, so each measurement starts from a fresh process.
 * Usage: node --import tsx bench/design-run-child.ts DESIGN.json OUT_DIR [--sequential]
 */
import { runDesignFile } from '../server/cli/run-design-file';

const [designPath, outDir, mode] = process.argv.slice(2);
if (!designPath || !outDir) throw new Error('usage: design-run-child.ts DESIGN.json OUT_DIR [--sequential]');
const result = await runDesignFile(designPath, { outDir, parallel: mode !== '--sequential' });
const bytes = result.files.reduce((s, f) => s + f.bytes, 0);
process.stdout.write(
  `${JSON.stringify({
    timings: result.timings,
    stages: result.run.timings,
    files: result.files.length,
    bytes,
    maxRssKiB: process.resourceUsage().maxRSS,
    efficiencyA: result.run.metrics.channels.a.efficiency?.value ?? null,
  })}\n`,
);
