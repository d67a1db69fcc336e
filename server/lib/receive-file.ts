/**
 * One file from a multipart form, read into memory with multer, for the routes that take uploads. Multer's
 * errors become 4xx AppErrors that say what to fix; the file lands on `req.file`, the other fields on `req.body`.
 */
import type { Request, Response } from 'express';
import multer from 'multer';
import { AppError } from './app-error';

export interface FileFormSpec {
  /** Largest file accepted, bytes. */
  maxBytes: number;
  /** Text fields allowed besides the file. */
  fields: number;
  /** Longest text field, bytes (UTF-8). */
  fieldBytes: number;
  /** What the file is, for messages: 'file', 'CSV file' … */
  what: string;
  /** Message when the file is too large (413). */
  tooLarge: string;
}

/** A reader of one-file forms: `await receive(req, res)` before looking at `req.file`. */
export function fileReceiver(spec: FileFormSpec): (req: Request, res: Response) => Promise<void> {
  const receive = multer({
    storage: multer.memoryStorage(),
    defParamCharset: 'utf8',
    limits: { fileSize: spec.maxBytes, files: 1, fields: spec.fields, fieldSize: spec.fieldBytes, parts: spec.fields + 1 },
  }).single('file');
  return (req, res) =>
    new Promise((resolve, reject) => {
      receive(req, res, (error: unknown) => {
        if (!error) return resolve();
        if (error instanceof multer.MulterError) {
          if (error.code === 'LIMIT_FILE_SIZE') return reject(new AppError(413, spec.tooLarge, { file: 'too large' }));
          if (error.code === 'LIMIT_FIELD_VALUE') {
            return reject(new AppError(400, `The form field "${error.field}" is longer than ${spec.fieldBytes} bytes; shorten it`, { [error.field ?? 'form']: 'too long' }));
          }
          if (error.code === 'LIMIT_UNEXPECTED_FILE') {
            return reject(new AppError(400, `Send one ${spec.what}, in the form field "file" (got "${error.field}")`, { file: 'missing' }));
          }
          return reject(new AppError(400, `The upload form is not acceptable: ${error.message}`));
        }
        reject(new AppError(400, `The upload could not be read as a multipart form; send the ${spec.what} in the form field "file"`));
      });
    });
}
