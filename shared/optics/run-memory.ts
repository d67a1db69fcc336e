/**
 * The estimated peak memory of a design run, before it starts: the server refuses a run whose estimate
 * exceeds its run workers' budget (RUN_MEMORY_BUDGET_MB) and the composer shows it as the size is chosen.
 *
 * A sum of parts, each proportional to the arrays it stands for:
 * - the process: Node, the FFT backend, the helper threads (a constant);
 * - the run's results, per cell: channel phases, cell parameters, the layout, the far fields under three
 *   inputs with their components, the channels' output fields, the preview scratch and the files being
 *   written. An image hologram in the far field costs no more than an analytic channel here (its retrieval
 *   runs before the results exist and stays below them: measured);
 * - propagation (axicon beams, lens foci, Fresnel holograms' retrieval and image planes), per cell of the
 *   zero-padded grid (padding·N)²: the padded spectrum, the transfer function, the FFT plan, the planes;
 * - the previews' tile pyramids the server's runs paint (PREVIEW_TILES_MAX_SIDE; the command line paints none),
 *   per pixel of their level 0.
 * Calibrated against measured peaks (DEVELOPERS.md "The memory of a run"): bench/design-run-child.ts runs a
 * design file in a fresh process and reports the resident-set high-water mark (VmHWM of /proc/self/status);
 * the per-cell constants are the slopes between 2048² and 4096² runs of the twin-image demo (2 iterations,
 * helper threads on and off), a Bessel pair and a Fresnel twin hologram, the constants raised until no measured
 * peak from 1024² to 4096² lay above its estimate. Measured / estimated, MiB (the highest of helper threads off
 * and on where both were measured): twin image 394 / 417, 880 / 972, 3118 / 3192 (1024², 2048², 4096²); through
 * the server's run pool with tile pyramids 919 / 1036 and 3104 / 3448 (2048², 4096²); an MRAF hologram beside a
 * tilt at 4096² 2711 / 3192; Bessel pair 641 / 693, 1431 / 1596, 4831 / 5208; Fresnel twin hologram 526 / 733,
 * 5746 / 5848. `npm run bench` prints each run's peak beside its estimate.
 */

const MIB = 1024 * 1024;

/** Node, the FFT backend and the run's helper threads, before any array of the design. */
export const PROCESS_BYTES = 232 * MIB;
/** Results and outputs per cell (bytes). */
export const RESULT_BYTES_PER_CELL = 185;
/** Angular-spectrum propagation: a constant (its FFT plan and helpers)… */
export const PROPAGATION_BYTES = 160 * MIB;
/** …and per cell of the zero-padded grid (bytes). */
export const PROPAGATION_BYTES_PER_CELL = 29;
/**
 * A hologram at a finite distance retrieves on the zero-padded grid: what that leaves in the FFT backend's
 * WebAssembly memory, which never shrinks, per cell of that grid (bytes; once, however many such holograms).
 */
export const FRESNEL_RETRIEVAL_BYTES_PER_CELL = 10;
/** Tile pyramids of the previews, per pixel of level 0 (bytes). */
export const TILE_BYTES_PER_PIXEL = 16;
/** Level 0's largest side when the caller does not say: the server's default PREVIEW_TILES_MAX_SIDE. */
export const DEFAULT_TILES_SIDE = 4096;

/** The parts of a design the estimate reads (a draft in the composer may lack defaults). */
export interface MemoryDesign {
  setup: { cells: number };
  channels: Record<'a' | 'b', { terms: readonly { kind: string; fresnelDistanceUm?: number }[] }>;
  simulation?: { padding?: number };
}

export interface RunMemoryPart {
  what: string;
  bytes: number;
}

export interface RunMemoryEstimate {
  /** Estimated peak resident memory of the run, bytes. */
  bytes: number;
  /** The same in MiB, rounded up. */
  mib: number;
  /** What it is made of, in the order above. */
  parts: RunMemoryPart[];
}

/**
 * Estimated peak memory of running `design` (module comment). `tilesMaxSide`: the largest side of the tile
 * pyramids' level 0 (the server's PREVIEW_TILES_MAX_SIDE; 0 for none, as on the command line). Example: the
 * twin-image demo at 4096 cells (two far-field holograms, no propagation) without tiles → 232 MiB + 4096²·185
 * bytes ≈ 3.1 GiB; with the server's tiles 256 MiB more.
 */
export function estimateRunMemory(design: MemoryDesign, options: { tilesMaxSide?: number } = {}): RunMemoryEstimate {
  const n = design.setup.cells;
  const cells = n * n;
  const padding = design.simulation?.padding ?? 2;
  const terms = [...design.channels.a.terms, ...design.channels.b.terms];
  const fresnel = terms.some((t) => t.kind === 'hologram' && t.fresnelDistanceUm !== undefined);
  const propagates = fresnel || terms.some((t) => t.kind === 'axicon' || t.kind === 'lens');
  const parts: RunMemoryPart[] = [
    { what: 'process and helper threads', bytes: PROCESS_BYTES },
    { what: `results of ${n}² cells`, bytes: RESULT_BYTES_PER_CELL * cells },
  ];
  if (propagates) parts.push({ what: `propagation on ${n * padding}² cells`, bytes: PROPAGATION_BYTES + PROPAGATION_BYTES_PER_CELL * cells * padding * padding });
  if (fresnel) parts.push({ what: `retrieval at a distance on ${n * padding}² cells`, bytes: FRESNEL_RETRIEVAL_BYTES_PER_CELL * cells * padding * padding });
  const tileSide = Math.min(n, options.tilesMaxSide ?? DEFAULT_TILES_SIDE);
  if (tileSide > 0) parts.push({ what: `preview tiles of ${tileSide}² pixels`, bytes: TILE_BYTES_PER_PIXEL * tileSide * tileSide });
  const bytes = parts.reduce((sum, part) => sum + part.bytes, 0);
  return { bytes, mib: Math.ceil(bytes / MIB), parts };
}

/** Example: 5_368_709_120 → '5.0 GiB'; 300 * 1024 ** 2 → '300 MiB'. */
export function formatMemory(bytes: number): string {
  return bytes >= 1024 * MIB ? `${(bytes / (1024 * MIB)).toFixed(1)} GiB` : `${Math.ceil(bytes / MIB)} MiB`;
}
