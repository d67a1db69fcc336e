import type { AtomLibraryDetail } from '../../../shared/schemas/atom-libraries';
import { AppError } from '../../lib/app-error';
import { AtomLibraryShareModel } from './atom-library-share.model';
import { findVisible, getAtomLibrary, type LibraryViewer } from './atom-library.service';

/** The viewer's own personal library, seen from this project; 403 for anyone else's or a project library. */
async function ownPersonalLibrary(projectId: number, id: number, viewer: LibraryViewer) {
  const library = await findVisible(projectId, id, viewer.userId, false);
  if (library.scope !== 'personal') throw new AppError(409, `Library ${id} already belongs to this project; only personal libraries are shared`);
  if (library.ownerId !== viewer.userId) {
    throw new AppError(403, `Only ${library.owner?.name ?? 'its owner'} may share or stop sharing their personal library`);
  }
  return library;
}

/** Shares the owner's personal library with the project: every member sees it and designers may use it. */
export async function shareAtomLibrary(projectId: number, id: number, viewer: LibraryViewer): Promise<AtomLibraryDetail> {
  await ownPersonalLibrary(projectId, id, viewer);
  await AtomLibraryShareModel.findOrCreate({ where: { atomLibraryId: id, projectId }, defaults: { atomLibraryId: id, projectId, sharedById: viewer.userId } });
  return getAtomLibrary(projectId, id, viewer);
}

/**
 * Stops sharing: the library is the owner's alone again here; revisions that already use it keep reading it.
 */
export async function unshareAtomLibrary(projectId: number, id: number, viewer: LibraryViewer): Promise<AtomLibraryDetail> {
  await ownPersonalLibrary(projectId, id, viewer);
  await AtomLibraryShareModel.destroy({ where: { atomLibraryId: id, projectId } });
  return getAtomLibrary(projectId, id, viewer);
}
