/**
 * A synthetic finished run's layout artifacts (no worker involved): the demo library, a 64² atom index that
 * cycles through the library, rotations, the GDSII, and drc.json from the engine's check under a 420 nm
 * minimum gap (so it holds gap violations), plus an owner's export override — enough for every layout,
 * design-check, report and fab-package route to answer.
 */
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { drcRecord } from '../../server/cli/drc-record';
import { ExportOverrideModel } from '../../server/components/fab/fab.model';
import { storeArtifacts } from '../../server/components/runs/run-artifacts';
import { atomLibraryToCsv } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { checkDesignRules } from '../../shared/optics/drc';
import { gdsiiBytes } from '../../shared/optics/gdsii';
import { encodeNpy } from '../../shared/optics/npy';
import type { DesignRun } from '../../shared/optics/pipeline';
import { designSchema, type DesignInput } from '../../shared/schemas/design';

export async function storeSyntheticLayout(runId: number, designInput: DesignInput, overrideBy: number | null = null): Promise<void> {
  const design = designSchema.parse({ ...designInput, designRules: { minGapNm: 420, minFeatureNm: 100, maxAspectRatio: 10 } });
  const n = design.setup.cells;
  const period = design.setup.periodNm * 1e-9;
  const library = demoAtomLibrary();
  const atomIndex = new Int32Array(n * n);
  const theta = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    atomIndex[i] = i % library.atoms.length;
    theta[i] = ((i % 17) / 17) * Math.PI;
  }
  const drc = checkDesignRules({ n, period, atomIndex, theta, library }, { minGap: 420e-9, minFeature: 100e-9, maxAspectRatio: 10 }, { maxViolations: 200 });
  const files: Record<string, Uint8Array | string> = {
    'design.json': JSON.stringify(design),
    'atoms.csv': atomLibraryToCsv(library),
    'atom_index.npy': encodeNpy(atomIndex, [n, n]),
    'theta.npy': encodeNpy(theta, [n, n]),
    'layout.gds': gdsiiBytes({ n, period, atomIndex, theta, library, usedAtomsOnly: true }),
    'drc.json': JSON.stringify(drcRecord({ design, drc } as unknown as DesignRun)),
  };
  const dir = await mkdtemp(join(tmpdir(), 'pw-fab-fixture-'));
  for (const [name, content] of Object.entries(files)) await writeFile(join(dir, name), content);
  await storeArtifacts(runId, dir, Object.keys(files).map((name) => ({ name, bytes: 0 })));
  await rm(dir, { recursive: true });
  await ExportOverrideModel.create({ runId, userId: overrideBy, reason: 'Synthetic layout of the authorization matrix', counts: drc.counts, at: new Date() });
}
