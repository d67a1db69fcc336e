#!/usr/bin/env node
// Entry of `npx phasewright` / `node bin/phasewright.mjs`: registers tsx's ES-module loader, then runs the
// TypeScript command line (server/cli/phasewright.ts), found from this file's own location.
import { register } from 'tsx/esm/api';

register();
const { main } = await import(new URL('../server/cli/phasewright.ts', import.meta.url).href);
process.exitCode = await main(process.argv.slice(2));
