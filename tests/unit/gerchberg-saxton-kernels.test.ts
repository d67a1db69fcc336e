/**
 * The Gerchberg–Saxton family's suite (tests/support/retrieval-suite.ts) on the WebAssembly SIMD kernels, loaded as
 * the command line and the server load them (server/lib/fft-node.ts).
 */
import { beforeAll, expect, it } from 'vitest';
import { fftKernels } from '../../shared/optics/fft';
import { initFftInNode } from '../../server/lib/fft-node';
import { describeRetrieval } from '../support/retrieval-suite';

beforeAll(async () => {
  await initFftInNode();
});

it('runs on the SIMD kernels', () => {
  expect(fftKernels()).not.toBeNull();
});

describeRetrieval('Gerchberg–Saxton family on the SIMD kernels');
