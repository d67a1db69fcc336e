/** Assembling the engine's WebAssembly kernels from their text (shared/optics/kernels.wat) with wabt. */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import wabtInit from 'wabt';

export const KERNELS_WAT = fileURLToPath(new URL('../../shared/optics/kernels.wat', import.meta.url));

/** The binary module of kernels.wat (validated). */
export async function assembleKernels(): Promise<Uint8Array> {
  const wabt = await wabtInit();
  const module = wabt.parseWat('kernels.wat', readFileSync(KERNELS_WAT, 'utf8'), { simd: true });
  try {
    module.validate();
    return module.toBinary({}).buffer;
  } finally {
    module.destroy();
  }
}
