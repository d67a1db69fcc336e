import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import type { DesignRuleViolationView } from '@shared/schemas/fab';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { ArrowLeftIcon } from '@/components/ui/icons';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useRun } from '@/features/runs/api/get-run';
import { useDesignCheck } from '@/features/fab/api/get-design-check';
import { LayoutViewer, viewAround, type LayoutView } from '@/features/fab/components/layout-viewer';
import { ViolationsList } from '@/features/fab/components/violations-list';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';
import { runStatusPhrase } from '@shared/display-names';

export default function RunLayoutRoute() {
  const { project } = useProjectOutlet();
  // Run ids have the same form as project ids.
  const runId = parseProjectId(useParams().runId);
  const run = useRun(project.id, runId);
  const succeeded = run.data?.status === 'succeeded';
  const check = useDesignCheck(project.id, runId ?? 0, succeeded);
  const n = run.data?.metrics?.run?.cells?.value ?? null;
  const [view, setView] = useState<LayoutView | null>(null);
  const [focus, setFocus] = useState<DesignRuleViolationView | null>(null);

  if (runId === null) return <Banner title="No such run">The link is mistyped.</Banner>;
  if (run.isPending || (succeeded && check.isPending)) return <PageLoader label="Loading the layout" />;
  if (run.isError) return <Banner title="The run did not load">{run.error.message}</Banner>;
  if (!succeeded) return <Banner tone="info" title="No layout yet">Run {runId} is {runStatusPhrase(run.data.status)}; a layout exists once it has finished.</Banner>;
  if (check.isError) return <Banner title="The design-rule result did not load">{check.error.message}</Banner>;
  const cells = n ?? 64;
  const current = view ?? viewAround(cells, cells / 2, cells / 2, Math.min(64, cells));
  return (
    <div className="flex flex-col gap-6">
      <title>{`Layout · run ${runId} · ${project.name} · Phasewright`}</title>
      <Link to={paths.projects.run.getHref(project.id, runId)} className="inline-flex items-center gap-1.5 text-sm font-bold text-ink-soft hover:text-ink">
        <ArrowLeftIcon className="size-4" />
        Run {runId}
      </Link>
      <Card title={`Layout of run ${runId}`} description="Every pillar as the GDSII places it: width × length rotated by its angle, centred on its cell.">
        <LayoutViewer projectId={project.id} runId={runId} n={cells} view={current} onViewChange={setView} focus={focus} />
      </Card>
      <Card title="Design-rule violations" description={`Checked with gap ≥ ${check.data!.rules.minGapNm} nm, feature ≥ ${check.data!.rules.minFeatureNm} nm, aspect ratio ≤ ${check.data!.rules.maxAspectRatio}.`}>
        <ViolationsList
          violations={check.data!.violations}
          total={check.data!.total}
          onShow={(v) => {
            setFocus(v);
            setView(viewAround(cells, v.ix, v.iy, Math.min(16, cells)));
          }}
        />
      </Card>
    </div>
  );
}

