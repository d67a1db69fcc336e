/**
 * The estimated peak memory of a design run, before it starts: the server refuses a run whose estimate
 * exceeds its run workers' budget (RUN_MEMORY_BUDGET_MB) and the composer shows it as the size is chosen.
 *
 * A sum of parts, each proportional to the arrays it stands for:
 * - the process: Node, the FFT backend, the helper threads (a constant);
 * - the run's results, per cell: channel phases, cell parameters, the layout, the far fields under three
 *   inputs with their components, the channels' output fields, the preview scratch and the files being
 *   written (about 190 bytes per cell);
 * - each image hologram, per cell: its target plane, its target intensity and what retrieval leaves behind;
 *   a hologram at a finite distance retrieves on the grid zero-padded by `simulation.padding`;
 * - propagation (axicon beams, lens foci, image planes of Fresnel holograms), per cell of the zero-padded
 *   grid (padding·N)²: the padded field, its spectrum and the transfer function.
 * Calibrated against measured peaks: the end-to-end benchmark (bench/run.ts, `npm run bench`) runs design
 * files at 1024², 2048² and 4096² in fresh processes, reads the resident-set high-water mark (VmHWM of
 * /proc/self/status) and prints it beside this estimate; the constants below are the per-cell slopes between
 * 2048² and 4096² with the constant raised until no measured peak was above the estimate (README
 * "Performance" lists the figures). The estimate is meant to err high at small sizes, where it does not matter.
 */

const MIB = 1024 * 1024;

/** Node, the FFT backend and the run's helper threads, before any array of the design. */
export const PROCESS_BYTES = 560 * MIB;
/** Results and outputs per cell (bytes). */
export const RESULT_BYTES_PER_CELL = 190;
/** One image hologram, per cell of its retrieval grid (bytes). */
export const HOLOGRAM_BYTES_PER_CELL = 48;
/** Angular-spectrum propagation, per cell of the zero-padded grid (bytes). */
export const PROPAGATION_BYTES_PER_CELL = 40;

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
 * Estimated peak memory of running `design` (module comment). Example: the twin-image demo at 4096 cells
 * (two Fourier holograms, no propagation) → 560 MiB + 4096²·(190 + 2·48) bytes ≈ 5.1 GiB.
 */
export function estimateRunMemory(design: MemoryDesign): RunMemoryEstimate {
  const n = design.setup.cells;
  const cells = n * n;
  const padding = design.simulation?.padding ?? 2;
  const padded = cells * padding * padding;
  const terms = [...design.channels.a.terms, ...design.channels.b.terms];
  const holograms = terms.filter((t) => t.kind === 'hologram');
  const fresnel = holograms.filter((t) => t.fresnelDistanceUm !== undefined).length;
  const propagates = fresnel > 0 || terms.some((t) => t.kind === 'axicon' || t.kind === 'lens');
  const parts: RunMemoryPart[] = [
    { what: 'process and helper threads', bytes: PROCESS_BYTES },
    { what: `results of ${n}² cells`, bytes: RESULT_BYTES_PER_CELL * cells },
  ];
  if (holograms.length) {
    parts.push({
      what: `${holograms.length} image hologram${holograms.length === 1 ? '' : 's'}`,
      bytes: HOLOGRAM_BYTES_PER_CELL * ((holograms.length - fresnel) * cells + fresnel * padded),
    });
  }
  if (propagates) parts.push({ what: `propagation on ${n * padding}² cells`, bytes: PROPAGATION_BYTES_PER_CELL * padded });
  const bytes = parts.reduce((sum, part) => sum + part.bytes, 0);
  return { bytes, mib: Math.ceil(bytes / MIB), parts };
}

/** Example: 5_368_709_120 → '5.0 GiB'; 300 * 1024 ** 2 → '300 MiB'. */
export function formatMemory(bytes: number): string {
  return bytes >= 1024 * MIB ? `${(bytes / (1024 * MIB)).toFixed(1)} GiB` : `${Math.ceil(bytes / MIB)} MiB`;
}
