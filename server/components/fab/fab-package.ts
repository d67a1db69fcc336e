/**
 * The fab package of a run: one zip, streamed with archiver while it is written — never the whole zip, and
 * never the whole GDSII, in memory: the stored files go in one after the other, a chunk at a time. Contents (under one folder named after the run):
 * - layout.gds — the stored file when the options equal the run's own (layer/datatype of the design,
 *   database unit 1 nm); otherwise regenerated with gdsii.ts from the stored atom_index/theta, on the layout
 *   worker (layout-jobs.ts, with its time limit) into a temporary file that is removed once sent;
 * - arrays/*.npy, previews/*.png, design.json, metrics.json, drc.json, atoms.csv — the stored artifacts;
 * - report.html — the design report, standalone; export.json — who exported when, with which options;
 * - README.txt — what each file is, units, the orientation frame, the library's status, the cautions (fab-readme.ts).
 * Refused (409) while design-rule violations stand and no owner has overridden them.
 */
import { pictureFrameText } from '../../../shared/schemas/pictures';
import { createReadStream } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { once } from 'node:events';
import type { Readable, Writable } from 'node:stream';
import { ZipArchive } from 'archiver';
import { buildReportModel, type ReportInput } from '../../../shared/report/design-report';
import type { FabPackageQuery, RunDesignCheck } from '../../../shared/schemas/fab';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';
import { findArtifact, listArtifacts } from '../runs/run-artifacts';
import type { RunModel } from '../runs/run.model';
import { slugOf } from '../runs/run.service';
import { FabExportModel } from './fab.model';
import { fabReadme } from './fab-readme';
import { reportHtml } from './report-html';
import { regenerateGds } from './layout-jobs';
import type { GdsOptions } from './layout-task';
import { artifactStream, designCheckOf, readArtifact } from './run-data';
import { parseAtomLibraryCsv } from '../../../shared/optics/atoms';
import type { Design } from '../../../shared/schemas/design';
import { uploadIdsOf } from '../revisions/design-assets';
import { UploadModel } from '../uploads/upload.model';

const KIND_WORDS = { gap: 'gap', feature: 'minimum feature', 'aspect-ratio': 'aspect ratio' } as const;

/** The 409 while violations stand. Example message: 'Export refused: 12 design-rule violations (12 gap) …'. */
export function refusal(check: RunDesignCheck): AppError {
  const kinds = (['gap', 'feature', 'aspect-ratio'] as const).filter((k) => check.counts[k] > 0);
  return new AppError(
    409,
    `Export refused: ${check.total} design-rule violation${check.total === 1 ? '' : 's'} (${kinds.map((k) => `${check.counts[k]} ${KIND_WORDS[k]}`).join(', ')}). ` +
      'Fix the design or the project’s design rules and run again, or a project owner can override with a recorded reason.',
    { violations: String(check.total), gap: String(check.counts.gap), feature: String(check.counts.feature), 'aspect-ratio': String(check.counts['aspect-ratio']) },
  );
}

/** Everything the report needs, read from the run's records. */
export async function reportInputOf(run: RunModel, projectName: string, check: RunDesignCheck): Promise<ReportInput> {
  const design = JSON.parse((await readArtifact(run.id, 'design.json'))?.toString('utf8') ?? 'null') as Design | null;
  if (!design) throw new AppError(409, `Run ${run.id} has no design.json; start the run again to produce it`);
  const metricsFile = await readArtifact(run.id, 'metrics.json');
  const metricsJson = metricsFile ? (JSON.parse(metricsFile.toString('utf8')) as { inputs?: ReportInput['inputs'] & object }) : null;
  const csv = await readArtifact(run.id, 'atoms.csv');
  const library = csv ? parseAtomLibraryCsv(csv.toString('utf8')).library : null;
  const uploadIds = uploadIdsOf(design);
  const uploads = uploadIds.length
    ? (await UploadModel.findAll({ where: { id: uploadIds, projectId: run.projectId }, attributes: ['id', 'name'] })).map((u) => ({ id: u.id, name: u.name }))
    : [];
  return {
    projectName,
    runId: run.id,
    revisionNumber: run.revision?.number ?? 0,
    finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
    design,
    metrics: run.metrics ?? null,
    inputs: metricsJson?.inputs ? { a: metricsJson.inputs.a, b: metricsJson.inputs.b } : null,
    library: library
      ? { name: library.name, approximate: library.approximate, source: library.source ?? null, material: library.material || null, atoms: library.atoms.length }
      : { name: 'unknown (atoms.csv missing)', approximate: true, source: null, material: null, atoms: 0 },
    check,
    uploads,
  };
}

/**
 * Checks that the run may be exported with these options, regenerates the GDSII on the layout worker when the
 * options differ from the run's own, records the download, and returns the file name and a function that
 * streams the zip into `out` (and then removes the regenerated file).
 */
export async function prepareFabPackage(config: AppConfig, run: RunModel, projectName: string, userId: number, query: FabPackageQuery) {
  const check = await designCheckOf(config, run);
  if (!check.exportAllowed) throw refusal(check);
  const reportInput = await reportInputOf(run, projectName, check);
  const { layer, datatype } = reportInput.design.layout;
  const defaults: GdsOptions = { layer, datatype, dbUnitNm: 1 };
  const options: GdsOptions = { layer: query.layer ?? defaults.layer, datatype: query.datatype ?? defaults.datatype, dbUnitNm: query.dbUnitNm ?? defaults.dbUnitNm };
  const storedGds = await findArtifact(run.id, 'layout.gds');
  const regenerated = !storedGds || options.layer !== defaults.layer || options.datatype !== defaults.datatype || options.dbUnitNm !== defaults.dbUnitNm;
  let gdsFile: string | null = null;
  if (regenerated) {
    const dir = await mkdtemp(join(tmpdir(), `phasewright-gds-${run.id}-`));
    gdsFile = join(dir, 'layout.gds');
    try {
      await regenerateGds(config, run, options, gdsFile);
    } catch (error) {
      await rm(dir, { recursive: true, force: true });
      throw error;
    }
  }
  const removeGds = () => (gdsFile ? rm(dirname(gdsFile), { recursive: true, force: true }) : Promise.resolve());

  const artifacts = await listArtifacts(run.id);
  const record = await FabExportModel.create({ runId: run.id, userId, options: { ...options, regenerated }, overrideId: check.exportAllowed && check.total > 0 ? check.latestOverrideId : null, at: new Date() });
  const folder = `${slugOf(projectName)}-r${reportInput.revisionNumber}-run${run.id}`;

  async function write(out: Writable): Promise<void> {
    const zip = new ZipArchive({ zlib: { level: 5 } });
    const failed = new Promise<never>((_, reject) => zip.on('error', reject));
    failed.catch(() => undefined);
    // A client that goes away stops the archive, and with it the reads from the database.
    const gone = new Promise<void>((resolve) =>
      out.once('close', () => {
        if (!out.writableFinished) zip.abort();
        resolve();
      }),
    );
    try {
      zip.pipe(out);
      const date = run.finishedAt ?? new Date();
      const name = (file: string) => ({ name: `${folder}/${file}`, date });
      let closed = false;
      void gone.then(() => (closed = true));
      /**
       * Appends a stored file and waits until the archive has taken it in. Archiver pipes every appended stream at
       * once, so appending all ~30 files of a run together would read the first chunks (up to 8 MiB each) of every
       * one into memory; one at a time holds a chunk or two, whatever the run's size.
       */
      const appendStream = async (source: Readable, data: ReturnType<typeof name> & { store?: boolean }) => {
        if (closed) return;
        const taken = once(zip, 'entry');
        taken.catch(() => undefined);
        zip.append(source, data);
        await Promise.race([taken, failed, gone]);
      };
      await appendStream(gdsFile ? createReadStream(gdsFile) : artifactStream(storedGds!.id), name('layout.gds'));
      const previews: { file: string; caption: string }[] = [];
      const placed: { place: string; label: string }[] = [{ place: 'layout.gds', label: '' }];
      for (const a of artifacts) {
        if (a.name === 'layout.gds') continue;
        const ids = await findArtifact(run.id, a.name);
        if (!ids) continue;
        const place = a.name.endsWith('.npy') ? `arrays/${a.name}` : a.name.endsWith('.png') ? `previews/${a.name}` : a.name;
        if (a.name.endsWith('.png')) {
          // README "Picture convention": each preview's axes in words (the report shows the PNG as it is).
          const frame = pictureFrameText((run.plots as Record<string, unknown> | null)?.pictures, a.name);
          previews.push({ file: place, caption: frame ? `${a.label} — ${frame}` : a.label });
        }
        placed.push({ place, label: a.label });
        await appendStream(artifactStream(ids.id), { ...name(place), store: a.name.endsWith('.png') });
      }
      const overrideNote = check.total > 0 && check.overrides.length ? ` Exported under the owner’s override of ${check.total} design-rule violations.` : '';
      const exportNote = `Fab package exported ${record.at.toISOString().slice(0, 16).replace('T', ' ')} UTC: GDSII layer ${options.layer}, datatype ${options.datatype}, database unit ${options.dbUnitNm} nm.${overrideNote}`;
      zip.append(reportHtml(buildReportModel(reportInput), previews, exportNote), name('report.html'));
      placed.push({ place: 'report.html', label: '' }, { place: 'export.json', label: '' });
      const { design } = reportInput;
      zip.append(
        fabReadme({
          folder,
          projectName,
          designName: design.name,
          revisionNumber: reportInput.revisionNumber,
          runId: run.id,
          files: placed,
          cells: design.setup.cells,
          periodNm: design.setup.periodNm,
          wavelengthNm: design.setup.wavelengthNm,
          gds: { ...options, regenerated },
          library: reportInput.library,
          exportNote,
        }),
        name('README.txt'),
      );
      zip.append(
        JSON.stringify(
          {
            format: 'phasewright-export/1',
            run: run.id,
            revision: reportInput.revisionNumber,
            exportedAt: record.at.toISOString(),
            exportedBy: userId,
            gdsii: { ...options, regenerated, userUnitUm: 1, angles: 'degrees counter-clockwise, θ mod 180° (0 for square pillars)' },
            designRules: { rules: check.rules, counts: check.counts, total: check.total },
            overrides: check.overrides,
          },
          null,
          2,
        ) + '\n',
        name('export.json'),
      );
      await Promise.race([zip.finalize(), failed, gone]);
    } finally {
      await removeGds();
    }
  }

  return { fileName: `${folder}-fab-package.zip`, write };
}
