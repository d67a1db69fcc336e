/** The messages between the run queue (main thread) and the run worker. */
import type { MessagePort } from 'node:worker_threads';
import type { AtomLibrary } from '../../../shared/optics/atoms';
import type { Design } from '../../../shared/schemas/design';
import type { RunHeadline } from '../../../shared/schemas/runs';
import type { TileOptions } from '../../cli/tiles';
import type { MetricSections } from './run-outcome';

export interface RunTaskUpload {
  id: number;
  name: string;
  mime: string;
  bytes: Uint8Array;
}

export interface RunTask {
  runId: number;
  design: Design;
  /** The uploads the design refers to, bytes included, so the worker needs no database. */
  uploads: RunTaskUpload[];
  /** The stored atom library the design uses (null: the demo library, made by the worker), atoms included. */
  atomLibrary?: { id: number; library: AtomLibrary } | null;
  /** An empty folder of this run; the worker writes the output files into `workDir/out`. */
  workDir: string;
  /** Use helper threads inside the run (two channels' retrieval in parallel, previews painted alongside). */
  parallel: boolean;
  /** Write the tile pyramids of the far fields and maps (server/cli/tiles.ts); null or omitted: none. */
  tiles?: TileOptions | null;
  /** Where the worker posts RunProgressMessage. */
  port: MessagePort;
}

export type RunProgressMessage =
  | { type: 'started' }
  | {
      type: 'progress';
      fraction: number;
      stage: string;
      /** New GS error values since the last message, per channel. */
      convergence: { a: number[]; b: number[] };
    }
  | { type: 'note'; message: string };

export interface RunOutputFile {
  name: string;
  bytes: number;
}

export type RunTaskResult =
  | {
      ok: true;
      outDir: string;
      files: RunOutputFile[];
      metrics: MetricSections;
      headline: RunHeadline;
      plots: Record<string, unknown>;
      convergence: { a: number[]; b: number[] };
    }
  /** `designProblem`: the designer can fix it (the message says how); otherwise an internal failure. */
  | { ok: false; designProblem: boolean; message: string; detail?: string };
