/** What the input worker (input-worker.ts) is asked to do, and what it answers. */
import type { CreateAtomLibraryInput } from '../../shared/schemas/atom-libraries';
import type { UploadKind } from '../../shared/schemas/uploads';
import type { CsvReading, CsvUploadLimits } from '../components/atom-libraries/atom-library-csv';
import type { CheckedUpload } from '../components/uploads/upload-decode';
import type { UploadLimits } from '../components/uploads/upload-inspect';

export type InputTask =
  | { type: 'upload'; bytes: Uint8Array; kind: UploadKind; limits: UploadLimits }
  | { type: 'atom-csv'; bytes: Uint8Array; input: CreateAtomLibraryInput; limits: CsvUploadLimits };

export type InputResult =
  | { ok: true; value: CheckedUpload | CsvReading }
  | { ok: false; status: number; message: string; details?: Record<string, string> };
