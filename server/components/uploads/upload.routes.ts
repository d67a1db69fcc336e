import { Router, type Request, type Response } from 'express';
import multer from 'multer';
import { createUploadSchema, UPLOAD_LIMITS } from '../../../shared/schemas/uploads';
import { AppError } from '../../lib/app-error';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { createUpload, listUploads, uploadContent } from './upload.service';

const MIB = 1024 * 1024;

const receive = multer({
  storage: multer.memoryStorage(),
  defParamCharset: 'utf8',
  limits: { fileSize: UPLOAD_LIMITS.maxBytes, files: 1, fields: 5, fieldSize: 1024, parts: 6 },
}).single('file');

/** Reads the multipart body into memory, turning multer's errors into messages that say what to fix. */
function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) => {
    receive(req, res, (error: unknown) => {
      if (!error) return resolve();
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE') {
          return reject(new AppError(413, `The file is larger than ${UPLOAD_LIMITS.maxBytes / MIB} MiB; make it smaller and upload again`, { file: 'too large' }));
        }
        if (error.code === 'LIMIT_UNEXPECTED_FILE') {
          return reject(new AppError(400, `Send one file, in the form field "file" (got "${error.field}")`, { file: 'missing' }));
        }
        return reject(new AppError(400, `The upload form is not acceptable: ${error.message}`));
      }
      reject(new AppError(400, 'The upload could not be read as a multipart form; send the file in the form field "file"'));
    });
  });
}

/** `/api/projects/:projectId/uploads`: pictures and phase maps a design refers to. */
export function uploadRoutes() {
  const router = Router({ mergeParams: true });

  router.get('/', requireProject('read'), async (req, res) => {
    res.json({ uploads: await listUploads(projectAccess(req).project.id) });
  });

  router.post('/', requireProject('design'), async (req, res) => {
    await receiveFile(req, res);
    const { kind } = parseInput(createUploadSchema, req.body);
    if (!req.file) throw new AppError(400, 'Choose a file: send it in the form field "file"', { file: 'missing' });
    const upload = await createUpload(projectAccess(req).project.id, currentUser(req).id, {
      kind,
      name: req.file.originalname,
      bytes: req.file.buffer,
    });
    res.status(201).json({ upload });
  });

  router.get('/:uploadId/content', requireProject('read'), async (req, res) => {
    const id = parseId(req.params.uploadId, 'uploadId');
    const content = await uploadContent(projectAccess(req).project.id, id);
    res.set({
      'Content-Type': content.mime,
      'Content-Length': String(content.bytes.length),
      'Content-Disposition': contentDisposition('inline', content.name),
      'X-Content-Type-Options': 'nosniff',
      'Cache-Control': 'private, max-age=3600',
    });
    res.end(content.bytes);
  });

  return router;
}
