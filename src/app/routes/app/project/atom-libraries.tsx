import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useNavigate, type LoaderFunctionArgs } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { atomLibrariesQueryOptions, useAtomLibraries } from '@/features/atom-libraries/api/get-atom-libraries';
import { AtomLibrariesTable } from '@/features/atom-libraries/components/atom-libraries-table';
import { CsvFormatGuide } from '@/features/atom-libraries/components/csv-format-guide';
import { UploadAtomLibraryForm } from '@/features/atom-libraries/components/upload-atom-library-form';
import { LibraryBuildsSection } from '@/features/library-builds/components/library-builds-section';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (projectId) void queryClient.prefetchQuery(atomLibrariesQueryOptions(projectId));
    return null;
  };

export default function ProjectAtomLibrariesRoute() {
  const { project } = useProjectOutlet();
  const navigate = useNavigate();
  const libraries = useAtomLibraries(project.id);
  const canUpload = projectRoleAllows(project.myRole, 'design') && !project.archived;
  const [warnings, setWarnings] = useState<string[]>([]);

  return (
    <>
      <title>{`Atom libraries of ${project.name} · Phasewright`}</title>
      <div className="mb-6 min-w-0">
        <h2 className="text-xl font-extrabold">Atom libraries</h2>
        <p className="mt-1 max-w-2xl text-sm text-ink-soft">
          A run maps every cell to the best meta-atom of the design’s library. The built-in demo library is approximate; compute a
          library by rigorous coupled-wave analysis below, or upload your lab’s own simulated or measured library as CSV, to design
          for fabrication.
        </p>
      </div>
      {warnings.length > 0 ? (
        <Banner tone="warning" title="Uploaded, with remarks" className="mb-6">
          <ul className="list-disc pl-5">
            {warnings.slice(0, 10).map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </Banner>
      ) : null}
      <div className="flex flex-col gap-6">
        {libraries.isPending ? (
          <PageLoader label="Loading atom libraries" />
        ) : libraries.isError ? (
          <Banner title="The atom libraries did not load">
            <p>{libraries.error.message}</p>
            <Button variant="secondary" size="sm" className="mt-3" onClick={() => void libraries.refetch()}>
              Try again
            </Button>
          </Banner>
        ) : (
          <AtomLibrariesTable libraries={libraries.data} libraryHref={(id) => paths.projects.atomLibrary.getHref(project.id, id)} />
        )}
        <LibraryBuildsSection projectId={project.id} canStart={canUpload} />
        {canUpload ? (
          <Card title="Upload a library" description="A CSV with the columns below. A personal library is yours alone, in every project, until you share it with one from its page.">
            <UploadAtomLibraryForm
              projectId={project.id}
              onUploaded={(library, remarks) => {
                if (remarks.length > 0) setWarnings(remarks);
                else navigate(paths.projects.atomLibrary.getHref(project.id, library.id));
              }}
            />
          </Card>
        ) : null}
        <CsvFormatGuide />
      </div>
    </>
  );
}
