/**
 * Assembles shared/optics/kernels.wat (WebAssembly text, SIMD) with wabt and writes the bytes into
 * shared/optics/kernels-wasm.ts, so the engine needs no assembler at run time and no file access.
 * Run after editing the .wat: `npx tsx scripts/build-kernels.ts`. tests/unit/kernels.test.ts fails while the
 * two disagree.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { assembleKernels } from './lib/kernels';

const target = fileURLToPath(new URL('../shared/optics/kernels-wasm.ts', import.meta.url));
const bytes = await assembleKernels();
const lines: string[] = [];
for (let i = 0; i < bytes.length; i += 24) lines.push('  ' + Array.from(bytes.subarray(i, i + 24)).join(', ') + ',');
const text = `/**
 * The engine's WebAssembly kernels (kernels.wat), assembled by scripts/build-kernels.ts — do not edit by hand.
 */
export const KERNELS_WASM = Uint8Array.of(
${lines.join('\n')}
);
`;
if (readFileSync(target, { encoding: 'utf8', flag: 'a+' }) !== text) writeFileSync(target, text);
console.log(`kernels-wasm.ts: ${bytes.length} bytes`);
