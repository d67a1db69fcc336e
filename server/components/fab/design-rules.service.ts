/**
 * A project's design rules: read (the defaults of shared/optics/drc.ts until an owner saves its own), saved,
 * and handed to every run of the project at the moment the run is given to a worker.
 */
import { DEFAULT_PROJECT_DESIGN_RULES, type ProjectDesignRules, type ProjectDesignRulesView } from '../../../shared/schemas/fab';
import { UserModel } from '../users/user.model';
import { ProjectDesignRulesModel } from './fab.model';

function rulesOf(row: ProjectDesignRulesModel | null): ProjectDesignRules {
  return row ? { minGapNm: row.minGapNm, minFeatureNm: row.minFeatureNm, maxAspectRatio: row.maxAspectRatio } : { ...DEFAULT_PROJECT_DESIGN_RULES };
}

/** The rules a run of the project uses: the project's own, or the defaults. */
export async function rulesForRun(projectId: number): Promise<ProjectDesignRules> {
  return rulesOf(await ProjectDesignRulesModel.findOne({ where: { projectId } }));
}

export async function getProjectDesignRules(projectId: number): Promise<ProjectDesignRulesView> {
  const row = await ProjectDesignRulesModel.findOne({ where: { projectId }, include: [{ model: UserModel, as: 'updatedBy', attributes: ['id', 'name'] }] });
  return {
    rules: rulesOf(row),
    isDefault: row === null,
    updatedAt: row ? row.updatedAt.toISOString() : null,
    updatedBy: row?.updatedBy ? { id: row.updatedBy.id, name: row.updatedBy.name } : null,
  };
}

export async function saveProjectDesignRules(projectId: number, rules: ProjectDesignRules, userId: number): Promise<ProjectDesignRulesView> {
  const row = await ProjectDesignRulesModel.findOne({ where: { projectId } });
  if (row) await row.update({ ...rules, updatedById: userId });
  else await ProjectDesignRulesModel.create({ projectId, ...rules, updatedById: userId });
  return getProjectDesignRules(projectId);
}
