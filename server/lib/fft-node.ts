/**
 * The optics engine's FFT backend in Node with its SIMD kernels: reads the backend's own `pffft.wasm` and
 * hands it to `initFft`, which then also runs the kernels of shared/optics/kernels.wat on the same memory.
 * Call once per thread that retrieves phases (worker threads included) before the engine runs.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { initFft } from '../../shared/optics/fft';

/** The bytes of the SIMD build's pffft.wasm, found next to its module. */
export function pffftSimdBinary(): Uint8Array {
  const require = createRequire(import.meta.url);
  return readFileSync(join(dirname(require.resolve('@echogarden/pffft-wasm/simd')), 'pffft.wasm'));
}

/** `initFft` with the SIMD kernels. Example: `await initFftInNode(); fftKernels() !== null` → true. */
export function initFftInNode(): Promise<void> {
  return initFft({ simdBinary: pffftSimdBinary() });
}
