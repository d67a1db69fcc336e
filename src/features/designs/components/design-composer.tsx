import { useEffect, useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import type { Project } from '@shared/schemas/projects';
import type { Revision } from '@shared/schemas/revisions';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { formatDateTime, formatRelative } from '@/lib/format';
import { useCreateRevision } from '@/features/designs/api/create-revision';
import { AdvancedSection } from '@/features/designs/components/advanced-section';
import { AtomLibrarySection } from '@/features/designs/components/atom-library-section';
import { ChannelSection } from '@/features/designs/components/channel-section';
import { DesignPreviewColumn, PREVIEW_COLUMN_GRID } from '@/features/designs/components/design-preview-column';
import { IssueList } from '@/features/designs/components/issue-list';
import { PolarizationSection } from '@/features/designs/components/polarization-section';
import { SaveRevisionDialog, type SaveMode } from '@/features/designs/components/save-revision-dialog';
import { SetupSection } from '@/features/designs/components/setup-section';
import { designSourceKey, parseSourceKey, useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { blankDesign, designTemplate, type DesignDraft } from '@/features/designs/utils/design-draft';
import { discardLocalDraft, keepLocalDraft, readLocalDraft } from '@/features/designs/utils/local-draft';
import { focusField } from '@/features/designs/utils/focus-field';

interface DesignComposerProps {
  project: Project;
  /** `${userId}:${projectId}:${revision number or 'template'}` of the design to open. */
  sourceKey: string;
  initialDraft: DesignDraft;
  baseRevision: Revision | null;
  /** Starts a run of a saved revision (runs live in their own feature; the route passes this in). */
  runStarter: RunStarter;
}

export interface RunStarter {
  mutateAsync(revisionNumber: number): Promise<{ run: { id: number } }>;
  isPending: boolean;
}

function UnsavedElsewhere({ sourceKey, onDiscard }: { sourceKey: string; onDiscard: () => void }) {
  const { projectId, revision } = parseSourceKey(sourceKey);
  return (
    <Banner tone="warning" title="You have unsaved changes in another draft">
      <p>
        {revision ? `They started from revision ${revision}` : 'They started from a new design'}
        {projectId ? ` in project ${projectId}` : ''}. Opening this design replaces them.
      </p>
      <div className="mt-3 flex flex-wrap gap-2">
        <Link to={paths.projects.design.getHref(projectId, revision)} className={buttonClasses('secondary', 'sm')}>
          Back to my changes
        </Link>
        <Button variant="solidDanger" size="sm" onClick={onDiscard}>
          Discard them and open this design
        </Button>
      </div>
    </Banner>
  );
}

export function DesignComposer({ project, sourceKey, initialDraft, baseRevision, runStarter: startRun }: DesignComposerProps) {
  const navigate = useNavigate();
  const canDesign = projectRoleAllows(project.myRole, 'design');
  const readOnly = !canDesign;
  const loadedKey = useDesignEditor((state) => state.sourceKey);
  const dirty = useDesignEditor((state) => state.dirty);
  const draft = useDesignEditor((state) => state.draft);
  const issues = useDesignEditor((state) => state.check.issues);
  const serverErrors = useDesignEditor((state) => state.serverErrors);
  const load = useDesignEditor((state) => state.load);
  const setServerErrors = useDesignEditor((state) => state.setServerErrors);
  const createRevision = useCreateRevision(project.id);
  const [saveMode, setSaveMode] = useState<SaveMode | null>(null);
  const [saveError, setSaveError] = useState<string | null>(null);
  const [notice, setNotice] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [showIssues, setShowIssues] = useState(false);
  /** Time of the unsaved edits restored from this browser, while they are shown as restored. */
  const [restoredAt, setRestoredAt] = useState<string | null>(null);

  const conflict =
    loadedKey !== null && loadedKey !== sourceKey && dirty && parseSourceKey(loadedKey).userId === parseSourceKey(sourceKey).userId;

  useEffect(() => {
    if (loadedKey === sourceKey || conflict) return;
    const kept = readOnly ? null : readLocalDraft<DesignDraft>(window.localStorage, sourceKey);
    load(sourceKey, kept ? kept.draft : initialDraft, baseRevision?.number ?? null);
    if (kept) {
      useDesignEditor.setState({ dirty: true });
      setRestoredAt(kept.savedAt);
    }
  }, [loadedKey, sourceKey, conflict, load, initialDraft, baseRevision, readOnly]);

  // Unsaved edits are kept in this browser until they are saved or discarded.
  useEffect(() => {
    if (readOnly || loadedKey !== sourceKey || !draft) return;
    if (dirty) keepLocalDraft(window.localStorage, sourceKey, draft);
    else discardLocalDraft(window.localStorage, sourceKey);
  }, [readOnly, loadedKey, sourceKey, draft, dirty]);

  function startOver(next: DesignDraft) {
    discardLocalDraft(window.localStorage, sourceKey);
    setRestoredAt(null);
    load(sourceKey, next, baseRevision?.number ?? null);
  }

  useEffect(() => {
    if (!dirty || readOnly) return;
    const warn = (event: BeforeUnloadEvent) => event.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty, readOnly]);

  if (conflict) {
    return (
      <UnsavedElsewhere
        sourceKey={loadedKey}
        onDiscard={() => {
          discardLocalDraft(window.localStorage, loadedKey);
          load(sourceKey, initialDraft, baseRevision?.number ?? null);
        }}
      />
    );
  }
  if (loadedKey !== sourceKey || !draft) return <PageLoader label="Opening the design" />;

  const issueCount = Object.keys(issues).length;
  const serverCount = Object.keys(serverErrors).length;

  function openSave(mode: SaveMode) {
    setNotice(null);
    setSaveError(null);
    if (issueCount > 0) {
      setShowIssues(true);
      const first = Object.keys(issues)[0];
      requestAnimationFrame(() => focusField(first));
      return;
    }
    setSaveMode(mode);
  }

  async function runSaved(number: number) {
    setNotice(null);
    try {
      const { run } = await startRun.mutateAsync(number);
      navigate(paths.projects.run.getHref(project.id, run.id));
    } catch (error) {
      setNotice({ tone: 'error', text: `The run did not start: ${isApiError(error) ? error.message : 'try again'}.` });
    }
  }

  async function save(message: string) {
    const mode = saveMode;
    const design = useDesignEditor.getState().check.design;
    if (!design || !mode) return;
    setSaveError(null);
    let revision: Revision;
    try {
      ({ revision } = await createRevision.mutateAsync({ design, message }));
    } catch (error) {
      if (isApiError(error)) {
        const { message: messageProblem, ...fieldDetails } = error.details;
        setServerErrors(fieldDetails);
        if (Object.keys(fieldDetails).length > 0 && !messageProblem) {
          setSaveMode(null);
          setShowIssues(true);
          setNotice({ tone: 'error', text: `Not saved: ${error.message}` });
          const first = Object.keys(fieldDetails)[0].replace(/^design\.?/, '');
          requestAnimationFrame(() => focusField(first));
        } else {
          setSaveError(messageProblem ?? error.message);
        }
      } else {
        setSaveError('Something unexpected happened — try again.');
      }
      return;
    }
    const savedKey = designSourceKey(parseSourceKey(sourceKey).userId, project.id, revision.number);
    discardLocalDraft(window.localStorage, sourceKey);
    setRestoredAt(null);
    load(savedKey, revision.design as DesignDraft, revision.number);
    if (mode === 'save-and-run') {
      try {
        const { run } = await startRun.mutateAsync(revision.number);
        setSaveMode(null);
        navigate(paths.projects.run.getHref(project.id, run.id));
        return;
      } catch (error) {
        setNotice({
          tone: 'error',
          text: `Saved as revision ${revision.number}, but the run did not start: ${isApiError(error) ? error.message : 'try again'}.`,
        });
      }
    } else {
      setNotice({ tone: 'success', text: `Saved as revision ${revision.number}.` });
    }
    setSaveMode(null);
    navigate(paths.projects.design.getHref(project.id, revision.number), { replace: true });
    window.scrollTo({ top: 0 });
  }

  const base = baseRevision && loadedKey === designSourceKey(parseSourceKey(sourceKey).userId, project.id, baseRevision.number) ? baseRevision : null;

  return (
    <div className="flex flex-col gap-6">
      <title>{`Design · ${project.name} · Phasewright`}</title>
      <div className="sticky top-0 z-10 -mx-2 flex flex-wrap items-center justify-between gap-3 rounded-2xl bg-paper/95 px-2 py-3 backdrop-blur">
        <div className="min-w-0">
          <h2 className="flex flex-wrap items-center gap-2 text-xl font-extrabold">
            {base ? `Revision ${base.number}` : 'New design'}
            {dirty ? <Badge tone="ember">Unsaved changes</Badge> : base ? <Badge tone="teal">Saved</Badge> : <Badge tone="muted">Not saved yet</Badge>}
            {readOnly ? <Badge tone="muted">Read only</Badge> : null}
          </h2>
          <p className="text-sm text-ink-soft">
            {base ? (
              <>
                {base.message ? `“${base.message}” · ` : ''}
                {base.createdBy ? `${base.createdBy.name}, ` : ''}
                <time dateTime={base.createdAt}>{formatRelative(base.createdAt)}</time> ·{' '}
              </>
            ) : null}
            <Link to={paths.projects.revisions.getHref(project.id)} className="font-bold text-teal underline-offset-4 hover:underline">
              All revisions
            </Link>
          </p>
        </div>
        {canDesign ? (
          <div className="flex flex-wrap items-center gap-2">
            {issueCount > 0 ? (
              <Button variant="quiet" size="sm" onClick={() => setShowIssues((value) => !value)} aria-expanded={showIssues}>
                <span className="text-danger">
                  {issueCount} {issueCount === 1 ? 'problem' : 'problems'}
                </span>
              </Button>
            ) : null}
            {!dirty && base ? (
              <>
                <Button variant="secondary" disabled title={`No changes since revision ${base.number}`}>
                  Save
                </Button>
                <Button onClick={() => void runSaved(base.number)} pending={startRun.isPending}>
                  Run revision {base.number}
                </Button>
              </>
            ) : (
              <>
                <Button variant="secondary" onClick={() => openSave('save')}>
                  Save
                </Button>
                <Button onClick={() => openSave('save-and-run')}>Save and run</Button>
              </>
            )}
          </div>
        ) : null}
      </div>

      {!base && canDesign ? (
        <div className="flex flex-wrap items-center gap-2 text-sm" role="group" aria-label="Start from">
          <span className="font-bold">Start from</span>
          <Button variant="secondary" size="sm" onClick={() => startOver(designTemplate(project.name))}>
            Demo template (two demo pictures, circular pair)
          </Button>
          <Button variant="secondary" size="sm" onClick={() => startOver(blankDesign(project.name))}>
            Blank design
          </Button>
          {dirty ? <span className="text-ink-soft">Either replaces your unsaved changes.</span> : null}
        </div>
      ) : null}
      {restoredAt && dirty ? (
        <Banner tone="info" title="Your unsaved changes were restored">
          <p>Kept in this browser since {formatDateTime(restoredAt)}; they stay here until you save or discard them.</p>
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => startOver(base ? (base.design as DesignDraft) : initialDraft)}>
            Discard them
          </Button>
        </Banner>
      ) : null}
      {readOnly ? (
        <Banner tone="info">You can read this design. Only owners and designers of the project can change, save or run it.</Banner>
      ) : null}
      {notice ? <Banner tone={notice.tone}>{notice.text}</Banner> : null}
      {serverCount > 0 ? <IssueList issues={serverErrors} design={draft} title="The server refused these values" /> : null}
      {showIssues && issueCount > 0 ? <IssueList issues={issues} design={draft} title="Fix these before saving" /> : null}

      <div className={PREVIEW_COLUMN_GRID}>
      <fieldset disabled={readOnly} className="flex min-w-0 flex-col gap-6">
        <legend className="sr-only">Design</legend>
        <SetupSection />
        <PolarizationSection />
        <ChannelSection projectId={project.id} channel="a" readOnly={readOnly} />
        <ChannelSection projectId={project.id} channel="b" readOnly={readOnly} />
        <AtomLibrarySection projectId={project.id} />
        <AdvancedSection projectId={project.id} />
      </fieldset>
      <DesignPreviewColumn projectId={project.id} />
      </div>

      <SaveRevisionDialog
        mode={saveMode}
        nextNumberHint={base ? 'The design is saved as the project’s next revision.' : 'The design is saved as the project’s first revision.'}
        pending={createRevision.isPending || startRun.isPending}
        error={saveError}
        onSubmit={(message) => void save(message)}
        onClose={() => setSaveMode(null)}
      />
    </div>
  );
}
