import type { Upload, UploadKind } from '../../../shared/schemas/uploads';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { formatBytes, requireStorageRoom, withStorage } from '../quotas/quota.service';
import { UserModel } from '../users/user.model';
import type { InputPool } from '../../lib/input-pool';
import { EXTENSIONS, type InspectedUpload } from './upload-inspect';
import { UploadModel } from './upload.model';

function toUploadDto(upload: UploadModel): Upload {
  return {
    id: upload.id,
    kind: upload.kind,
    name: upload.name,
    mime: upload.mime,
    width: upload.width,
    height: upload.height,
    size: upload.size,
    sha256: upload.sha256,
    createdAt: upload.createdAt.toISOString(),
    createdBy: upload.createdBy ? { id: upload.createdBy.id, name: upload.createdBy.name } : null,
  };
}

const METADATA = { exclude: ['bytes'] };

/**
 * A file name safe to store and to send back in a header: no folders, no control characters, at most 200
 * characters, ending in the extension of its real type. Example: ("C:\\maps\\rose.PNG", image/png) → "rose.png".
 */
export function cleanFileName(original: string, mime: InspectedUpload['mime']): string {
  const base = original.split(/[\\/]/).pop() ?? '';
  const stem = base
    .replace(/\.[^.]*$/, '')
    .replace(/[\u0000-\u001f\u007f"]/g, '')
    .trim();
  const short = Array.from(stem).slice(0, 180).join('');
  return `${short || 'upload'}.${EXTENSIONS[mime]}`;
}

/**
 * Checks the file (type, size, pixels, decode budget), decodes it once and hashes it on the input pool — only a
 * file that really decodes is kept — then stores the bytes within the project's storage quota.
 */
export async function createUpload(ctx: AppContext, inputs: InputPool, projectId: number, userId: number, input: { kind: UploadKind; name: string; bytes: Buffer }): Promise<Upload> {
  const what = `the file (${formatBytes(input.bytes.length)})`;
  await requireStorageRoom(ctx.config, projectId, input.bytes.length, what);
  const inspected = await inputs.checkUpload(input.bytes, input.kind);
  const created = await withStorage(ctx, projectId, input.bytes.length, what, (transaction) => UploadModel.create({
    projectId,
    kind: input.kind,
    name: cleanFileName(input.name, inspected.mime),
    mime: inspected.mime,
    width: inspected.width,
    height: inspected.height,
    size: input.bytes.length,
    sha256: inspected.sha256,
    bytes: input.bytes,
    createdById: userId,
  }, { transaction }));
  return getUpload(projectId, created.id);
}

/** Deletes an upload to free the project's storage; revisions that name it can no longer be run. */
export async function deleteUpload(projectId: number, id: number): Promise<void> {
  const deleted = await UploadModel.destroy({ where: { id, projectId } });
  if (!deleted) throw new AppError(404, `This project has no upload ${id}`);
}

export async function getUpload(projectId: number, id: number): Promise<Upload> {
  const upload = await UploadModel.findOne({ where: { id, projectId }, attributes: METADATA, include: [{ model: UserModel, as: 'createdBy', attributes: ['id', 'name'] }] });
  if (!upload) throw new AppError(404, `This project has no upload ${id}`);
  return toUploadDto(upload);
}

export async function listUploads(projectId: number): Promise<Upload[]> {
  const uploads = await UploadModel.findAll({
    where: { projectId },
    attributes: METADATA,
    include: [{ model: UserModel, as: 'createdBy', attributes: ['id', 'name'] }],
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
  });
  return uploads.map(toUploadDto);
}

/** The stored bytes with their type and name. */
export async function uploadContent(projectId: number, id: number): Promise<{ name: string; mime: string; bytes: Buffer }> {
  const upload = await UploadModel.findOne({ where: { id, projectId }, attributes: ['name', 'mime', 'bytes'] });
  if (!upload) throw new AppError(404, `This project has no upload ${id}`);
  return { name: upload.name, mime: upload.mime, bytes: upload.bytes };
}
