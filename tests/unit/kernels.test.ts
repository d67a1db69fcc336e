/**
 * The engine's WebAssembly SIMD kernels (shared/optics/kernels.wat), loaded as in the command line and the
 * server (server/lib/fft-node.ts): the committed bytes are the assembled text, the kernel computes what its
 * formula says, and phase retrieval running on it follows numpy step for step.
 */
import { execFileSync } from 'node:child_process';
import { beforeAll, describe, expect, it } from 'vitest';
import { fftKernels, getFft2d } from '../../shared/optics/fft';
import { retrievePhase } from '../../shared/optics/gerchberg-saxton';
import { KERNELS_WASM } from '../../shared/optics/kernels-wasm';
import { mulberry32 } from '../../shared/optics/random';
import { buildTargetPlane } from '../../shared/optics/target';
import { assembleKernels } from '../../scripts/lib/kernels';
import { initFftInNode } from '../../server/lib/fft-node';
import { PYTHON } from '../support/python';

beforeAll(async () => {
  await initFftInNode();
});

describe('SIMD kernels', () => {
  it('the committed kernels-wasm.ts holds kernels.wat as assembled by wabt (run scripts/build-kernels.ts after editing)', async () => {
    expect(Array.from(await assembleKernels())).toEqual(Array.from(KERNELS_WASM));
  });

  it('are loaded on the FFT backend memory when initFft gets the backend bytes', () => {
    expect(fftKernels()).not.toBeNull();
  });

  it('normalizeUniform: a·z/|z| for every complex value, (a, 0) where z = 0', () => {
    const n = 64;
    const plan = getFft2d(n);
    const data = plan.data;
    const random = mulberry32(7);
    for (let i = 0; i < data.length; i++) data[i] = (random() - 0.5) * 10 ** Math.floor(6 * random() - 3);
    data[6] = 0;
    data[7] = 0;
    const before = data.slice();
    const amplitude = 2.5;
    fftKernels()!.normalizeUniform(data.byteOffset + 4 * 2 * n, n * n - n, amplitude);
    let error = 0;
    for (let i = 0; i < n * n; i++) {
      const [re, im] = [before[2 * i], before[2 * i + 1]];
      const magnitude = Math.hypot(re, im);
      const expected = i < n ? [re, im] : magnitude > 0 ? [(amplitude * re) / magnitude, (amplitude * im) / magnitude] : [amplitude, 0];
      error = Math.max(error, Math.abs(data[2 * i] - expected[0]), Math.abs(data[2 * i + 1] - expected[1]));
    }
    // Float32 arithmetic: a few units in the last place of the amplitude; rows before the pointer untouched.
    expect(error).toBeLessThan(amplitude * 1e-6);
  });

  it('Gerchberg–Saxton on the kernels follows numpy.fft step by step (error reduction, Gerchberg & Saxton 1972)', () => {
    const lambda = 633e-9;
    const n = 64;
    const grid = { n, period: lambda, lambda };
    const size = 16;
    const pixels = new Uint8Array(size * size).map((_, i) => ((i % size) * 7 + Math.floor(i / size) * 3) % 256);
    const target = buildTargetPlane(grid, { width: size, height: size, pixels }, { units: 'cells', width: size, centerX: 12, centerY: -9 });
    const random = mulberry32(3);
    const start = Float64Array.from({ length: n * n }, () => 2 * Math.PI * random() - Math.PI);
    const iterations = 5;
    const result = retrievePhase({ grid, target, iterations, initialPhase: start });
    // Independent reference: numpy complex128, target in the centred layout moved to FFT order by ifftshift.
    const script = [
      'import json, sys, numpy as np',
      'd = json.load(sys.stdin); n = d["n"]',
      'T = np.fft.ifftshift(np.array(d["target"]).reshape(n, n))',
      'g = np.exp(1j * np.array(d["start"]).reshape(n, n))',
      'for _ in range(d["iterations"]):',
      '    G = np.fft.fft2(g)',
      '    G = np.where(T > 0, T * np.exp(1j * np.angle(G)), 0)',
      '    g = np.exp(1j * np.angle(np.fft.ifft2(G)))',
      'print(json.dumps(np.angle(g).ravel().tolist()))',
    ].join('\n');
    // Outside the window the target is zero, so `T > 0` marks the window's lit pixels; dark window pixels
    // get amplitude 0 either way.
    const input = JSON.stringify({ n, iterations, target: Array.from(target.amplitude), start: Array.from(start) });
    const expected = JSON.parse(execFileSync(PYTHON, ['-c', script], { input, encoding: 'utf8' })) as number[];
    let error = 0;
    for (let i = 0; i < n * n; i++) {
      const d = Math.abs(result.phase[i] - expected[i]) % (2 * Math.PI);
      error = Math.max(error, Math.min(d, 2 * Math.PI - d));
    }
    // Float32 FFTs against float64 over five iterations.
    expect(error).toBeLessThan(5e-4);
  });
});
