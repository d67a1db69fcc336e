/**
 * Type declarations for the PFFFT WebAssembly build (`@echogarden/pffft-wasm`), which ships without
 * types. Only the members the optics engine uses are declared. Pointers are byte offsets into the
 * module's linear memory; `HEAPF32` is replaced by a new view whenever the memory grows.
 */
declare module '@echogarden/pffft-wasm/simd' {
  import type { PffftModuleFactory } from '@echogarden/pffft-wasm';
  const factory: PffftModuleFactory;
  export default factory;
}

declare module '@echogarden/pffft-wasm' {
  export interface PffftModule {
    HEAPF32: Float32Array;
    /** Complex transforms need N = 2^a·3^b·5^c with N a multiple of 16. `transform`: 0 real, 1 complex. */
    _pffft_new_setup(n: number, transform: number): number;
    _pffft_destroy_setup(setup: number): void;
    /** `direction`: 0 forward (exp(−2πi kn/N)), 1 backward (exp(+2πi kn/N)); both unscaled. */
    _pffft_transform_ordered(setup: number, input: number, output: number, work: number, direction: number): void;
    /** The same with the frequency-domain side in PFFFT's internal order (forward output, backward input). */
    _pffft_transform(setup: number, input: number, output: number, work: number, direction: number): void;
    /** Canonical ↔ internal order (`direction` 0: internal → canonical, 1: canonical → internal); input ≠ output. */
    _pffft_zreorder(setup: number, input: number, output: number, direction: number): void;
    _pffft_aligned_malloc(bytes: number): number;
    _pffft_aligned_free(pointer: number): void;
    _pffft_simd_size(): number;
  }
  export interface PffftModuleOptions {
    locateFile?: (path: string, scriptDirectory: string) => string;
    /** Emscripten's hook to instantiate the module oneself: call `receive` with the instance; return {}. */
    instantiateWasm?: (imports: object, receive: (instance: unknown, module: unknown) => void) => object;
  }
  export type PffftModuleFactory = (options?: PffftModuleOptions) => Promise<PffftModule>;
  const factory: PffftModuleFactory;
  export default factory;
}
