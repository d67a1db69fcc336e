import { useState } from 'react';
import { projectDesignRulesSchema, type ProjectDesignRules } from '@shared/schemas/fab';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { NumberField } from '@/components/ui/number-field';
import { PageLoader } from '@/components/ui/spinner';
import { formatDateTime } from '@/lib/format';
import { isApiError } from '@/lib/api-client';
import { useDesignRules } from '@/features/fab/api/get-design-rules';
import { useUpdateDesignRules } from '@/features/fab/api/update-design-rules';

type Draft = { [K in keyof ProjectDesignRules]: number | undefined };

function RulesForm({ projectId, initial, onDone }: { projectId: number; initial: ProjectDesignRules; onDone: () => void }) {
  const [draft, setDraft] = useState<Draft>(initial);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const save = useUpdateDesignRules(projectId);
  const submit = () => {
    const parsed = projectDesignRulesSchema.safeParse(draft);
    if (!parsed.success) {
      const next: Record<string, string> = {};
      for (const issue of parsed.error.issues) next[String(issue.path[0])] ??= issue.message;
      setErrors(next);
      return;
    }
    setErrors({});
    save.mutate(parsed.data, { onSuccess: onDone, onError: (error) => isApiError(error) && setErrors(error.details) });
  };
  return (
    <form
      className="flex flex-col gap-4"
      onSubmit={(event) => {
        event.preventDefault();
        submit();
      }}
    >
      <NumberField label="Smallest gap between pillars" unit="nm" value={draft.minGapNm} onValueChange={(v) => setDraft({ ...draft, minGapNm: v })} error={errors.minGapNm} hint="Edge to edge, after rotation, between neighbouring cells." />
      <NumberField label="Smallest feature" unit="nm" value={draft.minFeatureNm} onValueChange={(v) => setDraft({ ...draft, minFeatureNm: v })} error={errors.minFeatureNm} />
      <NumberField label="Largest aspect ratio" value={draft.maxAspectRatio} onValueChange={(v) => setDraft({ ...draft, maxAspectRatio: v })} error={errors.maxAspectRatio} hint="Height ÷ smallest side." />
      {save.isError && !isApiError(save.error, 400) ? <Banner title="The rules were not saved">{save.error.message}</Banner> : null}
      <div className="flex gap-2">
        <Button type="submit" pending={save.isPending}>
          Save design rules
        </Button>
        <Button variant="quiet" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/** The project's design rules: every run checks its layout against them; owners edit them. */
export function DesignRulesSettingsCard({ projectId, canManage }: { projectId: number; canManage: boolean }) {
  const rules = useDesignRules(projectId);
  const [editing, setEditing] = useState(false);
  return (
    <Card
      title="Design rules"
      description="Every run of this project checks its layout against these rules; export is refused while violations stand."
      actions={
        canManage && !editing && rules.data ? (
          <Button variant="secondary" size="sm" onClick={() => setEditing(true)}>
            Edit rules
          </Button>
        ) : null
      }
    >
      {rules.isPending ? <PageLoader label="Loading design rules" /> : null}
      {rules.isError ? <Banner title="The design rules did not load">{rules.error.message}</Banner> : null}
      {rules.data && editing ? <RulesForm projectId={projectId} initial={rules.data.rules} onDone={() => setEditing(false)} /> : null}
      {rules.data && !editing ? (
        <>
          <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm" data-testid="design-rules">
            <dt className="font-bold">Smallest gap</dt>
            <dd className="tabular-nums">{rules.data.rules.minGapNm} nm</dd>
            <dt className="font-bold">Smallest feature</dt>
            <dd className="tabular-nums">{rules.data.rules.minFeatureNm} nm</dd>
            <dt className="font-bold">Largest aspect ratio</dt>
            <dd className="tabular-nums">{rules.data.rules.maxAspectRatio}</dd>
          </dl>
          <p className="mt-3 text-xs text-ink-soft">
            {rules.data.isDefault
              ? 'Defaults for e-beam written, etched dielectric pillars (common practice, no published source). Ask your fab for its own numbers.'
              : `Set by ${rules.data.updatedBy?.name ?? 'a former member'} on ${formatDateTime(rules.data.updatedAt!)}. New runs use them; finished runs keep the rules they were checked with.`}
          </p>
        </>
      ) : null}
    </Card>
  );
}
