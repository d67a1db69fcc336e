import type { ArtifactGroups } from '@/features/runs/components/artifact-groups';
import { formatBytes } from '@/features/runs/components/artifact-groups';
import { Card } from '@/components/ui/card';
import { formatDateTime } from '@/lib/format';
import { DownloadLink } from '@/features/runs/components/artifact-figure';
import { DeleteRunFilesButton } from '@/features/runs/components/delete-run-files-button';

interface RunDownloadsProps {
  projectId: number;
  runId: number;
  downloads: ArtifactGroups['downloads'];
  notes: string[];
  /** When the files were deleted to free storage, if they were. */
  filesDeletedAt?: string | null;
  /** Offer to delete the files (a designer or owner, once the run has finished). */
  canDelete?: boolean;
}

/** Every file the run stored, grouped by kind, each a plain download link. */
export function RunDownloads({ projectId, runId, downloads, notes, filesDeletedAt = null, canDelete = false }: RunDownloadsProps) {
  const totalBytes = downloads.reduce((sum, group) => sum + group.files.reduce((s, file) => s + file.size, 0), 0);
  return (
    <Card
      title="Files of this run"
      description="Everything the run stored. Each link saves the file under a name that carries the project and run."
      actions={canDelete && downloads.length > 0 ? <DeleteRunFilesButton projectId={projectId} runId={runId} totalBytes={totalBytes} /> : null}
    >
      {filesDeletedAt ? (
        <p className="text-sm text-ink-soft">The files of this run were deleted on {formatDateTime(filesDeletedAt)} to free storage.</p>
      ) : downloads.length === 0 ? (
        <p className="text-sm text-ink-soft">No files yet: a run stores them when it finishes.</p>
      ) : (
        <div className="gap-6 md:columns-2">
          {downloads.map((group) => (
            <section key={group.title} aria-label={`${group.title} files`} className="mb-6 break-inside-avoid">
              <h3 className="font-extrabold">{group.title}</h3>
              <p className="mb-2 text-xs text-ink-soft">{group.description}</p>
              <ul className="divide-y divide-line/70 rounded-2xl ring-1 ring-line/70 ring-inset">
                {group.files.map((artifact) => (
                  <li key={artifact.name} className="flex flex-wrap items-baseline justify-between gap-x-3 px-3 py-2">
                    <span className="min-w-0">
                      <DownloadLink projectId={projectId} runId={runId} artifact={artifact} />
                      {artifact.label ? <span className="block text-xs text-ink-soft">{artifact.label}</span> : null}
                    </span>
                    <span className="text-xs text-ink-soft tabular-nums">{formatBytes(artifact.size)}</span>
                  </li>
                ))}
              </ul>
            </section>
          ))}
        </div>
      )}
      {notes.length > 0 ? (
        <section aria-label="Notes on these results" className="border-t border-line pt-4">
          <h3 className="font-extrabold">Notes on these results</h3>
          <ul className="mt-1 list-disc space-y-1 pl-5 text-sm text-ink-soft">
            {notes.map((note) => (
              <li key={note}>{note}</li>
            ))}
          </ul>
        </section>
      ) : null}
    </Card>
  );
}
