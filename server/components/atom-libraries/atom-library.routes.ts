import { Router, type Request } from 'express';
import { createAtomLibrarySchema, type AtomCsvProblem } from '../../../shared/schemas/atom-libraries';
import type { AppConfig } from '../../config';
import type { InputPool } from '../../lib/input-pool';
import { AppError } from '../../lib/app-error';
import { fileReceiver } from '../../lib/receive-file';
import { contentDisposition } from '../../lib/content-disposition';
import { parseId, parseInput } from '../../lib/validate';
import { currentUser } from '../auth/auth.middleware';
import { projectAccess, requireProject } from '../projects/project-access';
import {
  atomLibraryCsv,
  createAtomLibrary,
  deleteAtomLibrary,
  getAtomLibrary,
  listAtomLibraries,
  type LibraryViewer,
} from './atom-library.service';
import { shareAtomLibrary, unshareAtomLibrary } from './atom-library-sharing.service';

const MIB = 1024 * 1024;

function viewerOf(req: Request): LibraryViewer {
  const user = currentUser(req);
  return { userId: user.id, siteAdmin: user.siteRole === 'admin', role: projectAccess(req).role };
}

function parseLibraryId(value: unknown): number | 'demo' {
  return value === 'demo' ? 'demo' : parseId(value, 'libraryId');
}

/** `{ "row 12, t_x": "…" }`: one entry per line and column, messages of the same place joined. */
function detailsOf(problems: AtomCsvProblem[]): Record<string, string> {
  const details: Record<string, string> = {};
  for (const p of problems) {
    const key = p.row === null ? p.column : `row ${p.row}, ${p.column}`;
    details[key] = details[key] ? `${details[key]}; ${p.message}` : p.message;
  }
  return details;
}

/** `/api/projects/:projectId/atom-libraries`: the demo library and uploaded CSV libraries. */
export function atomLibraryRoutes(config: AppConfig, inputs: InputPool) {
  const router = Router({ mergeParams: true });
  const receiveFile = fileReceiver({
    maxBytes: Math.floor(config.ATOM_CSV_MAX_MIB * MIB),
    fields: 8,
    fieldBytes: config.FORM_FIELD_MAX_BYTES,
    what: 'CSV file',
    tooLarge: `The library file is larger than ${config.ATOM_CSV_MAX_MIB} MiB; split it or remove unused atoms`,
  });

  router.get('/', requireProject('read'), async (req, res) => {
    res.json({ atomLibraries: await listAtomLibraries(projectAccess(req).project.id, viewerOf(req)) });
  });

  router.post('/', requireProject('design'), async (req, res) => {
    await receiveFile(req, res);
    const input = parseInput(createAtomLibrarySchema, req.body);
    if (!req.file) throw new AppError(400, 'Choose a CSV file: send it in the form field "file"', { file: 'missing' });
    const reading = await inputs.readAtomLibraryCsv(req.file.buffer, input);
    if (reading.problemCount > 0 || !reading.library) {
      const shown = reading.problems;
      const first = shown[0];
      const count = reading.problemCount;
      const listed = shown.length < count ? ` The first ${shown.length} are listed.` : '';
      res.status(400).json({
        error: `The atom library has ${count} problem${count === 1 ? '' : 's'}; fix ${count === 1 ? 'it' : 'them'} in the CSV and upload again.${listed} ${first.row === null ? '' : `Row ${first.row}, `}${first.column}: ${first.message}`,
        details: detailsOf(shown),
        problems: shown,
        problemCount: count,
      });
      return;
    }
    const projectId = projectAccess(req).project.id;
    const atomLibrary = await createAtomLibrary(projectId, viewerOf(req), reading.library, input.scope);
    res.status(201).json({ atomLibrary, warnings: reading.warnings });
  });

  router.get('/:libraryId', requireProject('read'), async (req, res) => {
    const id = parseLibraryId(req.params.libraryId);
    res.json({ atomLibrary: await getAtomLibrary(projectAccess(req).project.id, id, viewerOf(req)) });
  });

  router.get('/:libraryId/csv', requireProject('read'), async (req, res) => {
    const id = parseLibraryId(req.params.libraryId);
    const { name, csv } = await atomLibraryCsv(projectAccess(req).project.id, id, viewerOf(req));
    res.set({
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': contentDisposition('attachment', name),
      'X-Content-Type-Options': 'nosniff',
    });
    res.send(csv);
  });

  router.post('/:libraryId/share', requireProject('design'), async (req, res) => {
    const id = parseId(req.params.libraryId, 'libraryId');
    res.json({ atomLibrary: await shareAtomLibrary(projectAccess(req).project.id, id, viewerOf(req)) });
  });

  router.delete('/:libraryId/share', requireProject('design'), async (req, res) => {
    const id = parseId(req.params.libraryId, 'libraryId');
    res.json({ atomLibrary: await unshareAtomLibrary(projectAccess(req).project.id, id, viewerOf(req)) });
  });

  router.delete('/:libraryId', requireProject('design'), async (req, res) => {
    const raw = req.params.libraryId;
    if (raw === 'demo') throw new AppError(403, 'The demo library is built in and cannot be deleted');
    await deleteAtomLibrary(projectAccess(req).project.id, parseId(raw, 'libraryId'), viewerOf(req));
    res.status(204).end();
  });

  return router;
}
