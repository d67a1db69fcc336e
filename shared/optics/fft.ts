/**
 * Two-dimensional complex FFT of the optics engine, on square power-of-two grids (N = 64…8192;
 * 64…4096 for designs, 8192 for zero-padded propagation of the largest designs).
 *
 * Backend: PFFFT compiled to WebAssembly with SIMD (`@echogarden/pffft-wasm/simd`, single precision),
 * chosen by benchmark (bench/fft-bench.ts) over fft.js and ndarray-fft; it runs in Node and in browsers.
 * Data live in one interleaved float32 buffer (re, im, re, im…) inside the WebAssembly memory, allocated
 * once per plan. Rows are transformed one at a time; columns are copied out in strips of 32 that stay in cache
 * (8-byte complex values, 2×2 blocks), transformed there and copied back, so a 2-D transform is: rows, column
 * strips. A retrieval cycle (`cycle`) applies its constraints to the column strips and the rows while they are
 * in cache; a cycle limited to some spectrum columns copies just those. With the SIMD kernels a cycle over every
 * column leaves both passes in PFFFT's internal order (blocks of four consecutive frequencies, permuted), which
 * spares the reordering of every 1-D transform (3–5 % of a GS iteration at 1024²–2048²); its column copies then move
 * whole blocks. A cycle limited to a window keeps its rows in natural order: scattered blocks cost it more. `forwardTransposed` /
 * `inverseTransposed` transpose the square buffer in place instead (8×8 tiles) and leave the spectrum
 * transposed. With the SIMD kernels (kernels.wat) the copies, transposes and scaling run as WebAssembly SIMD too.
 *
 * Conventions (same as numpy.fft.fft2 / ifft2):
 * - forward  F[ky, kx] = Σ f[y, x] · exp(−2πi (ky·y + kx·x)/N), unscaled;
 * - inverse  f[y, x] = (1/N²) Σ F[ky, kx] · exp(+2πi (ky·y + kx·x)/N).
 * - Row-major, index = y·N + x. Spectra are unshifted (zero frequency at index 0); `fftshift2d` moves it to
 *   index (N/2, N/2), the centre used by every far-field map of the engine.
 * - Precision: float32 storage and arithmetic; against numpy complex128 the error is a few 1e-7 of the
 *   largest value (tests/unit/fft.test.ts).
 *
 * Usage: `await initFft()` once per thread (worker or page), then `createFft2d(n)` per size (or `getFft2d`
 * for a cached plan), and reuse the plan: every call works in place on `plan.data`.
 */
import type { PffftModule, PffftModuleOptions } from '@echogarden/pffft-wasm';
import { KERNELS_WASM } from './kernels-wasm';
import type { ComplexField } from './types';

const PFFFT_FORWARD = 0;
const PFFFT_BACKWARD = 1;
const PFFFT_COMPLEX = 1;
/** Tile edge of the in-place transpose, in complex elements (measured fastest on this engine's target CPUs). */
const TRANSPOSE_TILE = 8;
/**
 * Columns transformed together (a strip of 32·N complex values: 256 KiB at 1024², 1 MiB at 4096², within a core's
 * L2 cache). Measured on the 2-core build machine against transposing the whole buffer there and back (CPU time,
 * medians): a GS iteration at 1024² 13.6 against 15.2 ms, at 2048² 58 against 67 ms (strips of 16 were slower at
 * 2048², of 64 no faster); a forward FFT at 1024² 7.5 against 9.7 ms, at 2048² 39.5 against 45.9 ms, at 4096²
 * 139 against 181 ms.
 */
const STRIP_COLUMNS = 32;

export const MIN_FFT_SIZE = 64;
export const MAX_FFT_SIZE = 8192;

let pffft: PffftModule | null = null;
let loading: Promise<{ module: PffftModule; kernels: FftKernels | null }> | null = null;
let simdBackend = false;
let kernels: FftKernels | null = null;

export interface FftInitOptions {
  /** Where to load `pffft.wasm` from (browsers with bundlers); receives the file name and the script folder. */
  locateWasm?: (fileName: string, scriptDirectory: string) => string;
  /**
   * The bytes of the SIMD backend's `pffft.wasm` (next to `@echogarden/pffft-wasm/simd`), read by the caller.
   * Given, the engine instantiates the backend itself and runs its SIMD kernels (kernels.wat) on the same
   * memory, which speeds up phase retrieval (`fftKernels`); without them the JavaScript equivalents run.
   */
  simdBinary?: Uint8Array;
}

/**
 * The engine's WebAssembly SIMD kernels (kernels.wat), working in place on FFT plan buffers and on arrays
 * from `allocateKernelArray`. Pointers are byte offsets into the backend's memory; counts are complex values.
 */
export interface FftKernels {
  /**
   * Device-plane modulus constraint: each of `count` (a multiple of 4) complex float32 values at byte `pointer`
   * of the backend's memory becomes amplitude·z/|z|, or (amplitude, 0) where z = 0.
   */
  normalizeUniform(pointer: number, count: number, amplitude: number): void;
  /** The same with one float32 amplitude per value, at byte `amplitudes`. */
  normalize(pointer: number, count: number, amplitudes: number): void;
  /**
   * Image-plane modulus constraint of GS / weighted GS / MRAF with the iteration's error sums (kernels.wat
   * states the codes, the weights' update and the seven float64 sums added at byte `sums`). `weights` 0: none.
   */
  imagePlane(pointer: number, count: number, codes: number, weights: number, mix: number, keep: number, meanRatio: number, sums: number): void;
  /** z ← z·h (or z·conj h when `conjugate` is 1) with h the complex float32 values at byte `h`; count even. */
  multiplyComplex(pointer: number, count: number, h: number, conjugate: number): void;
  /** `imagePlane` on values in the backend's internal order (groups of 4 real parts, then 4 imaginary parts). */
  imagePlaneSplit(pointer: number, count: number, codes: number, weights: number, mix: number, keep: number, meanRatio: number, sums: number): void;
  /** `multiplyComplex` on values (and h) in the backend's internal order. */
  multiplyComplexSplit(pointer: number, count: number, h: number, conjugate: number): void;
  /** Multiplies `count` (even) complex float32 values by a real factor. */
  scale(pointer: number, count: number, factor: number): void;
  /** In-place transpose of an n×n complex float32 matrix, in tiles of `tile` (even, dividing n). */
  transpose(pointer: number, n: number, tile: number): void;
  /** Columns x … x + width − 1 of an n×n complex grid into rows of `columns` (toColumns 1) or back (0). */
  copyColumns(grid: number, n: number, x: number, width: number, columns: number, toColumns: number): void;
  /**
   * The same for a grid whose rows are in the backend's internal order: the `count` blocks of four positions from
   * block `first` into rows 0 … 4·count − 1 of `columns`, interleaved (toColumns 1), or back (0).
   */
  copyBlocks(grid: number, n: number, first: number, count: number, columns: number, toColumns: number): void;
}

/** The part of the WebAssembly API the kernels need (the engine is compiled without DOM or Node types). */
interface WasmApi {
  Memory: abstract new (...args: never[]) => object;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: Record<string, unknown> };
  instantiate(bytes: Uint8Array, imports: object): Promise<{ instance: { exports: Record<string, unknown> }; module: object }>;
}

/**
 * Instantiates the SIMD backend from its bytes, keeping hold of its memory, and the kernels on that memory.
 * Rejects when the bytes cannot be instantiated (the caller then loads the backend the usual way).
 */
async function loadWithKernels(
  factory: (options: PffftModuleOptions) => Promise<PffftModule>,
  moduleOptions: PffftModuleOptions,
  binary: Uint8Array,
): Promise<{ module: PffftModule; kernels: FftKernels }> {
  const wasm = (globalThis as unknown as { WebAssembly: WasmApi }).WebAssembly;
  let memory: object | undefined;
  let fail: (error: unknown) => void = () => undefined;
  const failed = new Promise<never>((_, reject) => (fail = reject));
  const module = await Promise.race([
    factory({
      ...moduleOptions,
      instantiateWasm: (imports, receive) => {
        wasm.instantiate(binary, imports).then(({ instance, module: compiled }) => {
          memory = Object.values(instance.exports).find((value): value is object => value instanceof wasm.Memory);
          receive(instance, compiled);
        }, fail);
        return {};
      },
    }),
    failed,
  ]);
  if (!memory) throw new Error('The FFT backend exports no memory');
  const exports = new wasm.Instance(new wasm.Module(KERNELS_WASM), { env: { memory } }).exports;
  const names = ['normalizeUniform', 'normalize', 'imagePlane', 'imagePlaneSplit', 'multiplyComplex', 'multiplyComplexSplit', 'scale', 'transpose', 'copyColumns', 'copyBlocks'] as const;
  const loaded = Object.fromEntries(names.map((name) => [name, exports[name]])) as unknown as FftKernels;
  return { module, kernels: loaded };
}

/**
 * Loads the WebAssembly FFT backend once per thread (SIMD build; scalar build if SIMD is unavailable).
 * Must be awaited before `createFft2d`. Example: `await initFft(); fftBackend()` → "pffft-wasm-simd".
 */
export async function initFft(options: FftInitOptions = {}): Promise<void> {
  if (pffft) return;
  if (!loading) {
    const moduleOptions: PffftModuleOptions = options.locateWasm ? { locateFile: options.locateWasm } : {};
    loading = (async () => {
      try {
        const simd = await import('@echogarden/pffft-wasm/simd');
        if (options.simdBinary) {
          try {
            return await loadWithKernels(simd.default, moduleOptions, options.simdBinary);
          } catch {
            // No SIMD kernels then: the backend alone, loaded the usual way.
          }
        }
        return { module: await simd.default(moduleOptions), kernels: null };
      } catch {
        const scalar = await import('@echogarden/pffft-wasm');
        return { module: await scalar.default(moduleOptions), kernels: null };
      }
    })();
  }
  try {
    const loaded = await loading;
    pffft = loaded.module;
    kernels = loaded.kernels;
    simdBackend = pffft._pffft_simd_size() === 4;
  } catch (error) {
    loading = null;
    throw error;
  }
}

/** True once `initFft()` has completed in this thread. */
export function fftReady(): boolean {
  return pffft !== null;
}

/** The SIMD kernels, when `initFft` was given the backend's bytes and they loaded; null otherwise. */
export function fftKernels(): FftKernels | null {
  return kernels;
}

/** Name of the loaded backend: "pffft-wasm-simd" or "pffft-wasm" (scalar). Throws before `initFft()`. */
export function fftBackend(): string {
  requireModule();
  return simdBackend ? 'pffft-wasm-simd' : 'pffft-wasm';
}

function requireModule(): PffftModule {
  if (!pffft) throw new Error('FFT backend not loaded: call `await initFft()` once in this thread first');
  return pffft;
}

/** Throws RangeError unless n is a power of two in [MIN_FFT_SIZE, MAX_FFT_SIZE]. */
export function assertFftSize(n: number): void {
  if (!Number.isInteger(n) || n < MIN_FFT_SIZE || n > MAX_FFT_SIZE || (n & (n - 1)) !== 0) {
    throw new RangeError(`FFT size must be a power of two from ${MIN_FFT_SIZE} to ${MAX_FFT_SIZE}, got ${n}`);
  }
}

/**
 * Operation applied to one row of the plan's buffer while that row is in cache.
 * `data` is the interleaved buffer, `offset` the float index of the row's first real part, `row` its index.
 */
export type RowOperation = (data: Float32Array, offset: number, row: number) => void;

/**
 * Index ranges [start, end) of rows or columns as a flat list [start0, end0, start1, end1, …] of increasing,
 * non-overlapping ranges inside 0…n. Example: [0, 8, 100, 120] selects indices 0–7 and 100–119.
 */
export type RowSpans = readonly number[];

/**
 * A 2-D FFT plan for one size n: its own interleaved complex float32 buffer `data` (length 2n²) in the
 * WebAssembly memory, a work buffer and precomputed twiddles. Not shareable between threads.
 */
export class Fft2d {
  readonly n: number;
  private readonly module: PffftModule;
  private setup: number;
  private dataPointer: number;
  private workPointer: number;
  private view: Float32Array;
  private pairs: Float64Array;
  /** Strip buffer of a cycle's spectrum columns, one per row (allocated on first use), and its views. */
  private columnsPointer = 0;
  private columnsCapacity = 0;
  private columnsView: Float32Array | null = null;
  private columnsPairs: Float64Array | null = null;
  private chained = false;
  /** With the SIMD kernels: the frequency index at each position of a cycle's spectrum rows (internal order). */
  private readonly order: Int32Array | null;

  constructor(n: number) {
    assertFftSize(n);
    const module = requireModule();
    this.n = n;
    this.module = module;
    this.setup = module._pffft_new_setup(n, PFFFT_COMPLEX);
    this.dataPointer = module._pffft_aligned_malloc(8 * n * n);
    this.workPointer = module._pffft_aligned_malloc(8 * n);
    if (!this.setup || !this.dataPointer || !this.workPointer) {
      throw new RangeError(`Not enough WebAssembly memory for a ${n}×${n} FFT plan`);
    }
    this.view = new Float32Array(module.HEAPF32.buffer, this.dataPointer, 2 * n * n);
    this.pairs = new Float64Array(module.HEAPF32.buffer, this.dataPointer, n * n);
    this.order = kernels ? this.internalOrder() : null;
  }

  /** Frequency index at each position of PFFFT's internal order: the indices 0…n−1 reordered (buffer clobbered). */
  private internalOrder(): Int32Array {
    const n = this.n;
    const data = this.data;
    for (let k = 0; k < n; k++) {
      data[2 * k] = k;
      data[2 * k + 1] = 0;
    }
    this.module._pffft_zreorder(this.setup, this.dataPointer, this.workPointer, PFFFT_BACKWARD);
    const internal = new Float32Array(this.module.HEAPF32.buffer, this.workPointer, 2 * n);
    // Groups of four values: four real parts, then four imaginary parts.
    const order = Int32Array.from({ length: n }, (_, p) => internal[8 * (p >> 2) + (p & 3)]);
    // Cycles move whole blocks of four positions, each holding four consecutive frequencies from a multiple of 4.
    for (let p = 0; p < n; p++) {
      if (order[p] !== order[p & ~3] + (p & 3) || order[p & ~3] % 4 !== 0) throw new Error(`FFT backend's internal order of ${n} is not in blocks of four`);
    }
    return order;
  }

  /**
   * The order of the values in the spectrum rows a cycle hands to its spectrum operation: null — natural order,
   * interleaved (re, im) (without the SIMD kernels); otherwise PFFFT's internal order, which saves the reordering
   * (10–30 % of a row transform): value p of a row is frequency index order[p] and each group of four values is
   * stored as four real parts, then four imaginary parts (the kernels' `…Split` variants work on it).
   */
  spectrumOrder(): Int32Array | null {
    return this.order;
  }

  /**
   * Interleaved complex buffer (re at 2i, im at 2i+1, i = y·n + x). The view is re-created if the
   * WebAssembly memory grew, so read this property again after creating another plan.
   */
  get data(): Float32Array {
    this.refreshViews();
    return this.view;
  }

  private refreshViews(): void {
    if (this.dataPointer === 0) throw new Error('FFT plan used after dispose()');
    const buffer = this.module.HEAPF32.buffer;
    if (this.view.buffer !== buffer) {
      this.view = new Float32Array(buffer, this.dataPointer, 2 * this.n * this.n);
      this.pairs = new Float64Array(buffer, this.dataPointer, this.n * this.n);
    }
    if (this.columnsPointer && (!this.columnsView || this.columnsView.buffer !== buffer)) {
      this.columnsView = new Float32Array(buffer, this.columnsPointer, 2 * this.n * this.columnsCapacity);
      this.columnsPairs = new Float64Array(buffer, this.columnsPointer, this.n * this.columnsCapacity);
    }
  }

  private assertNotChained(): void {
    if (this.chained) throw new Error('A chained cycle is pending: finish it with cycle(…, chainForward = false)');
  }

  /** Copies real and imaginary planes (length n², row-major) into the buffer; `im` omitted means zero. */
  load(re: ArrayLike<number>, im?: ArrayLike<number> | null): void {
    const size = this.n * this.n;
    if (re.length !== size || (im && im.length !== size)) {
      throw new RangeError(`Expected planes of length ${size} (${this.n}×${this.n}), got ${re.length}/${im ? im.length : '-'}`);
    }
    this.chained = false;
    const data = this.data;
    if (im) {
      for (let i = 0, j = 0; i < size; i++, j += 2) {
        data[j] = re[i];
        data[j + 1] = im[i];
      }
    } else {
      for (let i = 0, j = 0; i < size; i++, j += 2) {
        data[j] = re[i];
        data[j + 1] = 0;
      }
    }
  }

  /** Copies the buffer out into real and imaginary planes of length n², multiplied by `scale`. */
  store(re: Float64Array, im: Float64Array, scale = 1): void {
    const size = this.n * this.n;
    if (re.length !== size || im.length !== size) throw new RangeError(`Expected output planes of length ${size}`);
    const data = this.data;
    for (let i = 0, j = 0; i < size; i++, j += 2) {
      re[i] = data[j] * scale;
      im[i] = data[j + 1] * scale;
    }
  }

  /**
   * Forward 2-D FFT in place, exp(−2πi k·n/N), unscaled, zero frequency at index 0 (numpy.fft.fft2).
   * Example: a unit impulse at index 0 gives 1 + 0i in every bin.
   */
  forward(): void {
    this.assertNotChained();
    this.rowPass(PFFFT_FORWARD, null, -1, 1);
    this.columnPass([0, this.n], PFFFT_FORWARD, null, -1);
  }

  /**
   * Inverse 2-D FFT in place, exp(+2πi k·n/N), scaled by 1/N² (numpy.fft.ifft2), so inverse(forward(f)) = f.
   * Example: all bins equal to 1 give a unit impulse at index 0.
   */
  inverse(): void {
    this.assertNotChained();
    this.rowPass(PFFFT_BACKWARD, null, -1, 1 / (this.n * this.n));
    this.columnPass([0, this.n], PFFFT_BACKWARD, null, -1);
  }

  /**
   * Forward 2-D FFT leaving the spectrum transposed: afterwards element (ky, kx) sits at index kx·n + ky
   * (one transpose fewer than `forward`). Unscaled, unshifted. Pair with `inverseTransposed`.
   */
  forwardTransposed(): void {
    this.assertNotChained();
    this.rowPass(PFFFT_FORWARD, null, -1, 1);
    this.transpose();
    this.rowPass(PFFFT_FORWARD, null, -1, 1);
  }

  /** Inverse of `forwardTransposed`: transposed spectrum in, field out in normal order, scaled by 1/N². */
  inverseTransposed(): void {
    this.assertNotChained();
    this.rowPass(PFFFT_BACKWARD, null, -1, 1);
    this.transpose();
    this.rowPass(PFFFT_BACKWARD, null, -1, 1 / (this.n * this.n));
  }

  /**
   * One fused round trip field → spectrum → field, the building block of iterative retrieval:
   * forward FFT, `spectrumRow` on every spectrum row, inverse FFT (UNSCALED: the field comes back
   * multiplied by N² unless `spectrumRow` divides), `fieldRow` on every field row.
   * The spectrum is seen transposed and unshifted: row r holds kx index r, element j of that row is
   * ky index j (frequency index m means m for m < N/2, m − N otherwise).
   * `spectrumRow` gets spectrum rows in the plan's strip buffer, not in `data`: use the `data` and `offset` it
   * receives (the row argument is the kx index); with the SIMD kernels the values of a row are in the order
   * `spectrumOrder()` gives.
   * `spectrumRows`: only these spectrum rows (kx indices) are transformed and passed to `spectrumRow`; all
   * others are set to zero, for a constraint that zeroes them anyway — far less work. null: every row.
   * With `chainForward`, the forward row transforms of the next cycle are done while each field row is
   * still in cache; the buffer is then half-transformed until a cycle with `chainForward = false`.
   * Example: with no-op callbacks and chainForward = false, `data` ends as N²·(its initial value).
   */
  cycle(spectrumRow: RowOperation | null, fieldRow: RowOperation | null, chainForward: boolean, spectrumRows: RowSpans | null = null): void {
    const spans = spectrumRows ?? [0, this.n];
    assertSpans(spans, this.n);
    const limited = spanLength(spans) < this.n;
    if (this.order && !limited) {
      // Rows in internal order too: whole blocks of four columns go to the strips.
      if (!this.chained) this.rowPass(PFFFT_FORWARD, null, -1, 1, null, true);
      this.blockColumnPass(spectrumRow);
      this.rowPass(PFFFT_BACKWARD, fieldRow, chainForward ? PFFFT_FORWARD : -1, 1, null, true);
    } else {
      if (!this.chained) this.rowPass(PFFFT_FORWARD, null, -1, 1);
      this.columnPass(spans, PFFFT_FORWARD, spectrumRow, PFFFT_BACKWARD, this.order !== null);
      this.rowPass(PFFFT_BACKWARD, fieldRow, chainForward ? PFFFT_FORWARD : -1, 1, limited ? outsideRanges(spans, this.n) : null);
    }
    this.chained = chainForward;
  }

  /**
   * A cycle's column pass on rows in internal order: STRIP_COLUMNS / 4 blocks of four positions at a time are
   * copied into the strip buffer (`copyBlocks`), each of their columns transformed forward, given to `op` (row
   * argument = the column's frequency index), transformed back, and the strip copied home.
   */
  private blockColumnPass(op: RowOperation | null): void {
    const n = this.n;
    const order = this.order!;
    const blocks = n >> 2;
    const perStrip = Math.min(STRIP_COLUMNS, n) >> 2;
    this.reserveColumns(4 * perStrip);
    this.refreshViews();
    const view = this.columnsView!;
    for (let first = 0; first < blocks; first += perStrip) {
      kernels!.copyBlocks(this.dataPointer, n, first, perStrip, this.columnsPointer, 1);
      for (let k = 0; k < 4 * perStrip; k++) {
        const pointer = this.columnsPointer + 8 * n * k;
        this.transformAt(pointer, PFFFT_FORWARD, true);
        if (op) op(view, 2 * n * k, order[4 * first + k]);
        this.transformAt(pointer, PFFFT_BACKWARD, true);
      }
      kernels!.copyBlocks(this.dataPointer, n, first, perStrip, this.columnsPointer, 0);
    }
  }

  /** Frees the plan's WebAssembly memory; the plan cannot be used afterwards. */
  dispose(): void {
    if (this.dataPointer === 0) return;
    const module = this.module;
    module._pffft_aligned_free(this.dataPointer);
    module._pffft_aligned_free(this.workPointer);
    if (this.columnsPointer) module._pffft_aligned_free(this.columnsPointer);
    module._pffft_destroy_setup(this.setup);
    this.dataPointer = 0;
    this.workPointer = 0;
    this.columnsPointer = 0;
    this.setup = 0;
    if (cachedPlans.get(this.n) === this) cachedPlans.delete(this.n);
  }

  /** One in-place 1-D transform of the n complex values at byte `pointer` of the backend's memory. */
  private transformAt(pointer: number, direction: number, internal = false): void {
    if (internal) this.module._pffft_transform(this.setup, pointer, pointer, this.workPointer, direction);
    else this.module._pffft_transform_ordered(this.setup, pointer, pointer, this.workPointer, direction);
  }

  /**
   * Transforms every row (`first` direction), then optionally scales it, applies `op` and transforms it
   * again (`second`, −1 for none). With `zero` (float ranges [start, end) within a row), each row is first zeroed
   * there. `internal`: the frequency side of the rows in PFFFT's internal order.
   */
  private rowPass(first: number, op: RowOperation | null, second: number, scale: number, zero: readonly number[] | null = null, internal = false): void {
    const n = this.n;
    const rowBytes = 8 * n;
    const data = this.data;
    let pointer = this.dataPointer;
    for (let row = 0; row < n; row++, pointer += rowBytes) {
      const offset = 2 * n * row;
      if (zero) for (let z = 0; z < zero.length; z += 2) data.fill(0, offset + zero[z], offset + zero[z + 1]);
      this.transformAt(pointer, first, internal);
      if (scale !== 1 && kernels) {
        kernels.scale(pointer, n, scale);
      } else if (scale !== 1) {
        const end = offset + 2 * n;
        for (let i = offset; i < end; i++) data[i] *= scale;
      }
      if (op) op(data, offset, row);
      if (second >= 0) this.transformAt(pointer, second, internal);
    }
  }

  /**
   * The column transforms, strip by strip: up to STRIP_COLUMNS columns of `spans` at a time are copied into rows
   * of the strip buffer (small enough to stay in cache), each transformed (`first` direction), given to `op`
   * (row argument = column index), optionally transformed again (`second`, −1 for none), and the strip is
   * copied home. Columns outside `spans` are left as they are (a cycle's caller zeroes them). `internal`: the
   * frequency side in PFFFT's internal order (`spectrumOrder`), for a round trip.
   */
  private columnPass(spans: RowSpans, first: number, op: RowOperation | null, second: number, internal = false): void {
    const n = this.n;
    const strip = Math.min(STRIP_COLUMNS, n);
    this.reserveColumns(strip);
    this.refreshViews();
    const view = this.columnsView!;
    for (let s = 0; s < spans.length; s += 2) {
      for (let x = spans[s]; x < spans[s + 1]; x += strip) {
        const width = Math.min(strip, spans[s + 1] - x);
        this.copyColumns(x, width, true);
        for (let k = 0; k < width; k++) {
          const pointer = this.columnsPointer + 8 * n * k;
          this.transformAt(pointer, first, internal);
          if (op) op(view, 2 * n * k, x + k);
          if (second >= 0) this.transformAt(pointer, second, internal);
        }
        this.copyColumns(x, width, false);
      }
    }
  }

  /** Columns x … x + width − 1 of the buffer into rows 0 … width − 1 of the strip buffer, or back. */
  private copyColumns(x: number, width: number, toColumns: boolean): void {
    const n = this.n;
    if (kernels) {
      kernels.copyColumns(this.dataPointer, n, x, width, this.columnsPointer, toColumns ? 1 : 0);
      return;
    }
    const grid = this.pairs;
    const columns = this.columnsPairs!;
    const tile = TRANSPOSE_TILE;
    for (let y0 = 0; y0 < n; y0 += tile) {
      for (let k = 0; k < width; k++) {
        const row = k * n + y0;
        if (toColumns) for (let y = 0, p = y0 * n + x + k; y < tile; y++, p += n) columns[row + y] = grid[p];
        else for (let y = 0, p = y0 * n + x + k; y < tile; y++, p += n) grid[p] = columns[row + y];
      }
    }
  }

  /** Makes the column buffer hold at least `count` columns of n complex values. */
  private reserveColumns(count: number): void {
    if (count <= this.columnsCapacity) return;
    if (this.columnsPointer) this.module._pffft_aligned_free(this.columnsPointer);
    this.columnsPointer = this.module._pffft_aligned_malloc(8 * this.n * count);
    if (!this.columnsPointer) throw new RangeError(`Not enough WebAssembly memory for ${count} spectrum columns of ${this.n}`);
    this.columnsCapacity = count;
    this.columnsView = null;
    this.columnsPairs = null;
  }

  /** In-place transpose of the n×n complex matrix, moving each (re, im) float32 pair as one 8-byte word. */
  private transpose(): void {
    if (kernels) {
      kernels.transpose(this.dataPointer, this.n, TRANSPOSE_TILE);
      return;
    }
    this.refreshViews();
    const a = this.pairs;
    const n = this.n;
    const tile = TRANSPOSE_TILE;
    for (let i0 = 0; i0 < n; i0 += tile) {
      for (let i = i0; i < i0 + tile; i++) {
        for (let j = i + 1; j < i0 + tile; j++) {
          const p = i * n + j;
          const q = j * n + i;
          const t = a[p];
          a[p] = a[q];
          a[q] = t;
        }
      }
      for (let j0 = i0 + tile; j0 < n; j0 += tile) {
        for (let i = i0; i < i0 + tile; i++) {
          const rowI = i * n;
          for (let j = j0; j < j0 + tile; j++) {
            const p = rowI + j;
            const q = j * n + i;
            const t = a[p];
            a[p] = a[q];
            a[q] = t;
          }
        }
      }
    }
  }
}

/** Throws RangeError unless `spans` are increasing, non-overlapping [start, end) pairs inside 0…n. */
function assertSpans(spans: RowSpans, n: number): void {
  if (spans.length % 2 !== 0) throw new RangeError('Row spans come in [start, end) pairs');
  let previous = 0;
  for (let s = 0; s < spans.length; s += 2) {
    const start = spans[s];
    const end = spans[s + 1];
    if (!Number.isInteger(start) || !Number.isInteger(end) || start < previous || end <= start || end > n) {
      throw new RangeError(`Row spans must be increasing [start, end) pairs inside 0…${n}, got ${spans.join(', ')}`);
    }
    previous = end;
  }
}

/** Number of indices the spans cover. Example: spanLength([0, 3, 40, 52]) → 15. */
function spanLength(spans: RowSpans): number {
  let count = 0;
  for (let s = 0; s < spans.length; s += 2) count += spans[s + 1] - spans[s];
  return count;
}

/** Float ranges [start, end) of an interleaved row of n complex values outside the columns of `spans`. Example: outsideRanges([2, 5], 8) → [0, 4, 10, 16]. */
function outsideRanges(spans: RowSpans, n: number): number[] {
  const ranges: number[] = [];
  let from = 0;
  for (let s = 0; s < spans.length; s += 2) {
    if (spans[s] > from) ranges.push(2 * from, 2 * spans[s]);
    from = spans[s + 1];
  }
  if (from < n) ranges.push(2 * from, 2 * n);
  return ranges;
}

/** Creates a new plan of size n (power of two, 64…8192). Requires `await initFft()` first. */
export function createFft2d(n: number): Fft2d {
  return new Fft2d(n);
}

const cachedPlans = new Map<number, Fft2d>();

/** Returns this thread's shared plan of size n, creating it on first use (buffers allocated once). */
export function getFft2d(n: number): Fft2d {
  let plan = cachedPlans.get(n);
  if (!plan) {
    plan = new Fft2d(n);
    cachedPlans.set(n, plan);
  }
  return plan;
}

/**
 * Memory of the engine in the FFT backend's own heap, where the SIMD kernels reach it by `pointer` (phase
 * retrieval's target codes, weights and transfer function). Freed memory stays in that heap and is reused by
 * the next allocation, already paged in. Views are re-created when the memory grew: take them after the last
 * allocation. Example: `const a = allocateKernelArray(16); a.float64()[0] = 1; a.free();`
 */
export class KernelArray {
  readonly bytes: number;
  private address: number;
  private readonly module: PffftModule;

  constructor(bytes: number) {
    this.module = requireModule();
    this.bytes = bytes;
    this.address = this.module._pffft_aligned_malloc(bytes);
    if (!this.address) throw new RangeError(`Not enough WebAssembly memory for ${bytes} bytes of working arrays`);
  }

  /** Byte offset in the backend's memory (16-byte aligned). */
  get pointer(): number {
    if (this.address === 0) throw new Error('Kernel array used after free()');
    return this.address;
  }

  float32(): Float32Array {
    return new Float32Array(this.module.HEAPF32.buffer, this.pointer, this.bytes >> 2);
  }

  float64(): Float64Array {
    return new Float64Array(this.module.HEAPF32.buffer, this.pointer, this.bytes >> 3);
  }

  free(): void {
    if (this.address) this.module._pffft_aligned_free(this.address);
    this.address = 0;
  }
}

/** `bytes` of backend memory for kernel operands (see KernelArray). Requires `await initFft()` first. */
export function allocateKernelArray(bytes: number): KernelArray {
  return new KernelArray(bytes);
}

function fieldTransform(field: ComplexField, out: ComplexField | undefined, inverse: boolean): ComplexField {
  const n = field.n;
  if (field.re.length !== n * n || field.im.length !== n * n) throw new RangeError(`Field planes must have length ${n * n}`);
  const result = out ?? { n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
  if (result.n !== n) throw new RangeError(`Output field size ${result.n} differs from input size ${n}`);
  const plan = getFft2d(n);
  plan.load(field.re, field.im);
  if (inverse) plan.inverse();
  else plan.forward();
  plan.store(result.re, result.im);
  return result;
}

/**
 * numpy.fft.fft2 of a ComplexField: exp(−2πi k·n/N), unscaled, zero frequency at index 0 (not shifted).
 * Example: fft2 of a field equal to 1 everywhere (N = 64) is 4096 at index 0 and 0 elsewhere.
 */
export function fft2(field: ComplexField, out?: ComplexField): ComplexField {
  return fieldTransform(field, out, false);
}

/**
 * numpy.fft.ifft2 of a ComplexField: exp(+2πi k·n/N), scaled by 1/N², input unshifted.
 * Example: ifft2(fft2(f)) equals f to float32 precision (≈1e-7 relative).
 */
export function ifft2(field: ComplexField, out?: ComplexField): ComplexField {
  return fieldTransform(field, out, true);
}

type RealPlane = Float64Array | Float32Array;

function shift2d<T extends RealPlane>(input: T, n: number, output: T | undefined, s: number): T {
  if (input.length !== n * n) throw new RangeError(`Plane length ${input.length} is not ${n}×${n}`);
  const out = output ?? (new (input.constructor as new (length: number) => T)(n * n));
  if (out === input) throw new RangeError('fftshift2d/ifftshift2d work out of place: pass a distinct output');
  if (out.length !== n * n) throw new RangeError(`Output length ${out.length} is not ${n}×${n}`);
  for (let y = 0; y < n; y++) {
    const ty = ((y + s) % n) * n;
    const sy = y * n;
    for (let x = 0; x < n; x++) out[ty + ((x + s) % n)] = input[sy + x];
  }
  return out;
}

/**
 * numpy.fft.fftshift over both axes of an n×n row-major plane: moves index 0 to (⌊n/2⌋, ⌊n/2⌋).
 * Out of place. Example (n = 4): the value at index 0 moves to index 2·4 + 2 = 10.
 */
export function fftshift2d<T extends RealPlane>(input: T, n: number, output?: T): T {
  return shift2d(input, n, output, Math.floor(n / 2));
}

/**
 * numpy.fft.ifftshift over both axes: inverse of fftshift2d (moves (⌊n/2⌋, ⌊n/2⌋) back to index 0).
 * Out of place. Example (n = 4): the value at index 10 moves to index 0.
 */
export function ifftshift2d<T extends RealPlane>(input: T, n: number, output?: T): T {
  return shift2d(input, n, output, n - Math.floor(n / 2));
}

/** fftshift2d applied to both planes of a ComplexField (centres the zero frequency). */
export function fftshiftField(field: ComplexField): ComplexField {
  return { n: field.n, re: fftshift2d(field.re, field.n), im: fftshift2d(field.im, field.n) };
}

/** ifftshift2d applied to both planes of a ComplexField. */
export function ifftshiftField(field: ComplexField): ComplexField {
  return { n: field.n, re: ifftshift2d(field.re, field.n), im: ifftshift2d(field.im, field.n) };
}
