/**
 * The input pool: worker threads (piscina) that parse and decode uploaded files — pictures, phase maps, atom
 * library CSVs — so that no upload costs the request thread more than copying its bytes. Each task has a time
 * limit (the thread is terminated past it) and each thread a heap limit (worker_threads resourceLimits); the
 * buffers a decode allocates outside the heap are bounded before decoding by the upload limits
 * (upload-inspect.ts). A full queue answers 503, a task past its time 422, a thread out of heap 413.
 */
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { CreateAtomLibraryInput } from '../../shared/schemas/atom-libraries';
import type { UploadKind } from '../../shared/schemas/uploads';
import type { CsvReading, CsvUploadLimits } from '../components/atom-libraries/atom-library-csv';
import type { CheckedUpload } from '../components/uploads/upload-decode';
import type { UploadLimits } from '../components/uploads/upload-inspect';
import type { AppConfig } from '../config';
import { AppError } from './app-error';
import type { InputResult, InputTask } from './input-task';
import { workerExecArgv, workerFile } from './worker-pool';

const MIB = 1024 * 1024;
const WORKER_FILE = workerFile('input-worker', import.meta.url);

export interface InputPoolState {
  threads: number;
  maxThreads: number;
  /** Tasks running now. */
  running: number;
  /** Tasks waiting for a thread. */
  queued: number;
  maxQueue: number;
}

export interface InputPool {
  /** Inspects, decodes and hashes an upload; its type, size and SHA-256, or AppError 4xx/503. */
  checkUpload(bytes: Buffer, kind: UploadKind): Promise<CheckedUpload>;
  /** Reads an atom-library CSV with the configured limits. */
  readAtomLibraryCsv(bytes: Buffer, input: CreateAtomLibraryInput): Promise<CsvReading>;
  state(): InputPoolState;
  close(): Promise<void>;
}

/** The limits of uploads and library files, from the configuration. */
function inputLimits(config: AppConfig): { upload: UploadLimits; csv: CsvUploadLimits } {
  return {
    upload: {
      maxSide: config.UPLOAD_MAX_SIDE,
      maxDecodedBytes: Math.floor(config.UPLOAD_MAX_DECODED_MIB * MIB),
      jpegMaxScans: config.JPEG_MAX_SCANS,
      npyMaxHeaderBytes: config.NPY_MAX_HEADER_BYTES,
    },
    csv: {
      maxBytes: Math.floor(config.ATOM_CSV_MAX_MIB * MIB),
      maxRows: config.ATOM_CSV_MAX_ROWS,
      maxColumns: config.ATOM_CSV_MAX_COLUMNS,
      maxLineChars: config.ATOM_CSV_MAX_LINE_CHARS,
      maxIssues: config.ATOM_CSV_MAX_PROBLEMS,
    },
  };
}

export function createInputPool(config: AppConfig): InputPool {
  const limits = inputLimits(config);
  const maxThreads = Math.min(config.UPLOAD_DECODE_THREADS, availableParallelism());
  const pool = new Piscina<InputTask, InputResult>({
    filename: WORKER_FILE.href,
    // One thread started at once, so the first upload does not wait for a thread to load; idle threads do not keep the process alive.
    minThreads: 1,
    maxThreads,
    maxQueue: config.UPLOAD_DECODE_QUEUE,
    idleTimeout: 60_000,
    execArgv: workerExecArgv(WORKER_FILE),
    resourceLimits: { maxOldGenerationSizeMb: config.UPLOAD_DECODE_HEAP_MIB, maxYoungGenerationSizeMb: 16 },
  });
  let running = 0;
  const seconds = config.UPLOAD_DECODE_TIMEOUT_MS / 1000;

  async function run(task: InputTask, what: string, simpler: string): Promise<InputResult & { ok: true }> {
    let result: InputResult;
    running++;
    try {
      result = await pool.run(task, { signal: AbortSignal.timeout(config.UPLOAD_DECODE_TIMEOUT_MS) });
    } catch (error) {
      const e = error as { name?: string; code?: string; message?: string };
      if (e.name === 'AbortError') {
        throw new AppError(422, `Reading the ${what} took longer than ${seconds} s and was stopped; ${simpler} and upload again.`, {
          file: 'took too long',
        });
      }
      if (e.message === 'Task queue is at limit' || e.message?.startsWith('No task queue available')) {
        throw new AppError(503, `The server is reading ${config.UPLOAD_DECODE_QUEUE + maxThreads} other files; upload again in a minute.`, { file: 'busy' });
      }
      if (e.code === 'ERR_WORKER_OUT_OF_MEMORY') {
        throw new AppError(413, `Reading the ${what} needed more than ${config.UPLOAD_DECODE_HEAP_MIB} MiB of memory and was stopped; make it smaller and upload again.`, {
          file: 'too much memory',
        });
      }
      throw error;
    } finally {
      running--;
    }
    if (!result.ok) throw new AppError(result.status, result.message, result.details);
    return result;
  }

  /** The bytes as a plain Uint8Array (posting it to the thread copies them; the caller keeps its Buffer). */
  const plain = (bytes: Buffer) => new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return {
    async checkUpload(bytes, kind) {
      return (await run({ type: 'upload', bytes: plain(bytes), kind, limits: limits.upload }, 'file', 'save it in a simpler form (fewer pixels, a baseline JPEG or a PNG)')).value as CheckedUpload;
    },
    async readAtomLibraryCsv(bytes, input) {
      return (await run({ type: 'atom-csv', bytes: plain(bytes), input, limits: limits.csv }, 'library file', 'split it into smaller files')).value as CsvReading;
    },
    state() {
      return { threads: pool.threads.length, maxThreads, running, queued: pool.queueSize, maxQueue: config.UPLOAD_DECODE_QUEUE };
    },
    async close() {
      await pool.destroy();
    },
  };
}
