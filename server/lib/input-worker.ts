/**
 * The input worker: parses and decodes what users upload, away from the request thread, under the time and
 * heap limits of its pool (input-pool.ts). Answers refusals as plain data (an AppError cannot cross threads).
 */
import { readAtomLibraryCsv } from '../components/atom-libraries/atom-library-csv';
import { checkUpload } from '../components/uploads/upload-decode';
import { AppError } from './app-error';
import type { InputResult, InputTask } from './input-task';

export default async function runInputTask(task: InputTask): Promise<InputResult> {
  const bytes = Buffer.from(task.bytes.buffer, task.bytes.byteOffset, task.bytes.byteLength);
  try {
    if (task.type === 'upload') return { ok: true, value: await checkUpload(bytes, task.kind, task.limits) };
    return { ok: true, value: readAtomLibraryCsv(bytes, task.input, task.limits) };
  } catch (error) {
    if (error instanceof AppError) return { ok: false, status: error.status, message: error.message, details: error.details };
    throw error;
  }
}
