import { useCallback, useMemo } from 'react';
import type { AtomRow } from '@shared/schemas/atom-libraries';
import type { LibraryBuild, LibraryBuildAtom, LibraryBuildResult } from '@shared/schemas/library-builds';
import { Card } from '@/components/ui/card';
import { PhaseCoverageChart, RetardanceHistogram } from '@/features/atom-libraries/components/atom-library-charts';
import { AtomTable } from '@/features/atom-libraries/components/atom-table';
import { ConvergenceCharts } from '@/features/library-builds/components/convergence-chart';
import { SweepHeatMap, type SweepQuantity } from '@/features/library-builds/components/sweep-heat-map';

const ORIENTATION =
  'w, the pillar’s size along x, grows to the right; l, its size along y, grows upwards (one square per atom, x right and y up as in every Phasewright picture).';

interface MapSpec {
  title: string;
  measure: string;
  quantity: SweepQuantity;
  value: (atom: LibraryBuildAtom) => number;
}

const TRANSMISSION_MAPS: MapSpec[] = [
  { title: '|t| for x-polarized input', measure: '|t_x|', quantity: 'amplitude', value: (a) => a.tx },
  { title: 'Phase for x-polarized input', measure: 'α_x', quantity: 'phase', value: (a) => a.alphaX },
  { title: '|t| for y-polarized input', measure: '|t_y|', quantity: 'amplitude', value: (a) => a.ty },
  { title: 'Phase for y-polarized input', measure: 'α_y', quantity: 'phase', value: (a) => a.alphaY },
];

const DIFFRACTION_MAPS: MapSpec[] = [
  { title: 'Zeroth-order transmittance, x input', measure: 'T₀ for x (fraction of the incident power)', quantity: 'power', value: (a) => a.zeroOrderX },
  { title: 'Transmitted into other orders, x input', measure: 'other orders for x (fraction of the incident power)', quantity: 'power', value: (a) => a.otherOrdersX },
  { title: 'Reflected, all orders, x input', measure: 'R for x (fraction of the incident power)', quantity: 'power', value: (a) => a.reflectedX },
  { title: 'Zeroth-order transmittance, y input', measure: 'T₀ for y (fraction of the incident power)', quantity: 'power', value: (a) => a.zeroOrderY },
  { title: 'Transmitted into other orders, y input', measure: 'other orders for y (fraction of the incident power)', quantity: 'power', value: (a) => a.otherOrdersY },
  { title: 'Reflected, all orders, y input', measure: 'R for y (fraction of the incident power)', quantity: 'power', value: (a) => a.reflectedY },
];

function MapGrid({ maps, result, stepNm, columns }: { maps: MapSpec[]; result: LibraryBuildResult; stepNm: number; columns: 2 | 3 }) {
  return (
    <div className={`grid gap-6 md:grid-cols-2 ${columns === 3 ? 'xl:grid-cols-3' : ''}`}>
      {maps.map((m) => (
        <SweepHeatMapItem key={m.title} spec={m} result={result} stepNm={stepNm} />
      ))}
    </div>
  );
}

function SweepHeatMapItem({ spec, result, stepNm }: { spec: MapSpec; result: LibraryBuildResult; stepNm: number }) {
  const value = useCallback((atom: LibraryBuildAtom) => spec.value(atom), [spec]);
  return <SweepHeatMap title={spec.title} measure={spec.measure} quantity={spec.quantity} value={value} atoms={result.atoms} sizesNm={result.sizesNm} stepNm={stepNm} />;
}

/** The largest of a power over the atoms, x and y input. */
function largest(atoms: LibraryBuildAtom[], x: keyof LibraryBuildAtom, y: keyof LibraryBuildAtom): number {
  return atoms.reduce((worst, a) => Math.max(worst, a[x] as number, a[y] as number), 0);
}

const percent = (v: number) => `${(100 * v).toFixed(1)} %`;

/** What a finished build computed: maps over (w, l), lattice diffraction, coverage, convergence and the subset. */
export function BuildResults({ build, result }: { build: LibraryBuild; result: LibraryBuildResult }) {
  const rows: AtomRow[] = useMemo(
    () => result.atoms.map((a) => ({ id: a.id, shape: 'rect', widthNm: a.widthNm, lengthNm: a.lengthNm, heightNm: build.spec.heightNm, tx: a.tx, alphaX: a.alphaX, ty: a.ty, alphaY: a.alphaY })),
    [result.atoms, build.spec.heightNm],
  );
  const subset = useMemo(() => (result.subset ? rows.filter((row) => result.subset!.includes(row.id)) : null), [rows, result.subset]);
  const stepNm = build.spec.sweep.stepNm;
  const others = largest(result.atoms, 'otherOrdersX', 'otherOrdersY');
  const reflected = largest(result.atoms, 'reflectedX', 'reflectedY');
  const kept =
    result.storedCount !== undefined && result.storedCount < result.atoms.length
      ? ` The stored library keeps ${result.storedCount} of these ${result.atoms.length} atoms: only the pillars that fit their cell at every rotation.`
      : '';
  return (
    <div className="flex flex-col gap-6">
      <Card title="Transmission over (w, l)" description={`Zeroth-order amplitude |t| and phase α of every atom of the sweep.${kept} ${ORIENTATION}`}>
        <MapGrid maps={TRANSMISSION_MAPS} result={result} stepNm={stepNm} columns={2} />
      </Card>
      <Card
        title="Lattice diffraction"
        description={`The library keeps the zeroth order, the light that forms the designed wavefront. Light in other orders of the lattice, and light reflected, is lost to the design: at most ${percent(others)} of the incident power goes into other transmitted orders and at most ${percent(reflected)} is reflected (in all orders, including those the lattice diffracts back into the incident medium). ${ORIENTATION}`}
      >
        <MapGrid maps={DIFFRACTION_MAPS} result={result} stepNm={stepNm} columns={3} />
      </Card>
      <div className="grid gap-6 lg:grid-cols-2">
        <Card title="Phase coverage" description="α_x against α_y of every atom. A usable library fills the square without wide gaps.">
          <PhaseCoverageChart atoms={rows} />
        </Card>
        <Card title="Retardance spread" description="How many atoms give each phase difference α_x − α_y, wrapped to (−π, π].">
          <RetardanceHistogram atoms={rows} />
        </Card>
      </div>
      <Card
        title="Convergence against harmonics"
        description="For a few atoms of the sweep: the change of each amplitude and phase from its value at the most harmonics computed. Solid lines x input, dashed y input."
      >
        <ConvergenceCharts report={result.convergence} />
      </Card>
      {subset ? (
        <Card
          title={`Proposed subset of ${subset.length} atoms`}
          description="The atoms that cover the (α_x, α_y) square best at high transmission."
        >
          <div className="flex flex-col gap-6">
            <div className="max-w-xl">
              <PhaseCoverageChart atoms={subset} />
            </div>
            <AtomTable atoms={subset} />
          </div>
        </Card>
      ) : null}
    </div>
  );
}
