import { Router } from 'express';
import { createUploadSchema } from '../../../shared/schemas/uploads';
import type { AppContext } from '../../context';
import type { InputPool } from '../../lib/input-pool';
import { AppError } from '../../lib/app-error';
import { fileReceiver } from '../../lib/receive-file';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import { createUpload, deleteUpload, listUploads, uploadContent } from './upload.service';

const MIB = 1024 * 1024;

/** `/api/projects/:projectId/uploads`: pictures and phase maps a design refers to; files are checked on the input pool. */
export function uploadRoutes(ctx: AppContext, inputs: InputPool) {
  const { config } = ctx;
  const router = Router({ mergeParams: true });
  const receiveFile = fileReceiver({
    maxBytes: Math.floor(config.UPLOAD_MAX_MIB * MIB),
    fields: 5,
    fieldBytes: config.FORM_FIELD_MAX_BYTES,
    what: 'file',
    tooLarge: `The file is larger than ${config.UPLOAD_MAX_MIB} MiB; make it smaller and upload again`,
  });

  router.get('/', requireProject('read'), async (req, res) => {
    res.json({ uploads: await listUploads(projectAccess(req).project.id) });
  });

  router.post('/', requireProject('design'), async (req, res) => {
    await receiveFile(req, res);
    const { kind } = parseInput(createUploadSchema, req.body);
    if (!req.file) throw new AppError(400, 'Choose a file: send it in the form field "file"', { file: 'missing' });
    const upload = await createUpload(ctx, inputs, projectAccess(req).project.id, currentUser(req).id, {
      kind,
      name: req.file.originalname,
      bytes: req.file.buffer,
    });
    res.status(201).json({ upload });
  });

  router.delete('/:uploadId', requireProject('design'), async (req, res) => {
    const id = parseId(req.params.uploadId, 'uploadId');
    await deleteUpload(projectAccess(req).project.id, id);
    res.status(204).end();
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
