/**
 * README.txt of a fab package: what each file in the zip is, in which units, the frame the layout and the
 * pictures are drawn in (README.md, "Picture convention"), the status of the atom library, and the cautions —
 * which defer to the lab's own rules. Plain text, so it reads the same in any viewer.
 */
import { FABRICATION_CAUTION, LASER_SAFETY_CAUTION } from '../../../shared/report/design-report';

export interface FabReadmeInput {
  /** Folder name inside the zip. */
  folder: string;
  projectName: string;
  designName: string;
  revisionNumber: number;
  runId: number;
  /** Files in the zip besides README.txt, as placed (e.g. 'arrays/phase_a.npy'), with the run's own label when it has one. */
  files: { place: string; label: string }[];
  cells: number;
  periodNm: number;
  wavelengthNm: number;
  gds: { layer: number; datatype: number; dbUnitNm: number; regenerated: boolean };
  library: { name: string; approximate: boolean; source: string | null };
  exportNote: string;
}

/** What a file is and its units, by name; null for files without a fixed meaning (the label says). */
function describe(name: string): string | null {
  const base = name.slice(name.lastIndexOf('/') + 1);
  const fixed: Record<string, string> = {
    'layout.gds': 'GDSII layout of the pillars (see "Layout and orientation" below).',
    'design.json': 'The design as run, every default filled in (wavelength and period in nm, angles in degrees, lengths in µm).',
    'metrics.json': 'Every figure of merit with its unit and one-line meaning; lengths in metres, fractions as 0…1, ratios in dB.',
    'drc.json': 'Design rules used (nm), violation counts and the first violations with their cell (ix, iy).',
    'atoms.csv': 'The atom library the layout was mapped with: sizes in nm, transmissions tx, ty (0…1), phases αx, αy in radians.',
    'report.html': 'The design report, standalone; prints cleanly to PDF from a browser.',
    'export.json': 'Who exported this package when, with which GDSII options and design-rule overrides.',
    'phase_a.npy': 'Designed phase of channel A per cell, radians, float64, N×N.',
    'phase_b.npy': 'Designed phase of channel B per cell, radians, float64, N×N.',
    'delta_x.npy': 'Ideal propagation phase δx per cell, radians, float64, N×N.',
    'delta_y.npy': 'Ideal propagation phase δy per cell, radians, float64, N×N.',
    'theta.npy': 'Ideal rotation θ per cell, radians counter-clockwise from +x, float64, N×N.',
    'atom_index.npy': 'Index of the placed atom per cell (row of atoms.csv, from 0), int32, N×N.',
    'farfield_a.npy': 'Simulated far-field intensity under input A, float32, N×N, zero order at (N/2, N/2), step λ/(N·P) in sin θ.',
    'farfield_b.npy': 'Simulated far-field intensity under input B, float32, N×N, zero order at (N/2, N/2), step λ/(N·P) in sin θ.',
  };
  if (fixed[base]) return fixed[base];
  if (base.endsWith('.png')) return 'Preview picture (not to scale for fabrication).';
  if (base.endsWith('.npy')) return 'numpy array (NEP 1 .npy, C order, row-major [iy, ix]).';
  return null;
}

/** The README text. Example: readme.split('\n')[0] → 'Fab package — Twin-image security tag'. */
export function fabReadme(input: FabReadmeInput): string {
  const side = (input.cells * input.periodNm) / 1000;
  const lines: string[] = [];
  lines.push(`Fab package — ${input.designName}`);
  lines.push(`${input.projectName} · revision ${input.revisionNumber} · run ${input.runId}`);
  lines.push(input.exportNote, '');
  lines.push('FILES', '');
  const width = Math.max(...input.files.map((f) => f.place.length), 'README.txt'.length);
  lines.push(`${'README.txt'.padEnd(width)}  This file.`);
  for (const f of input.files) {
    const what = describe(f.place) ?? '';
    const label = f.label && !what.toLowerCase().includes(f.label.toLowerCase()) ? ` (${f.label})` : '';
    lines.push(`${f.place.padEnd(width)}  ${what}${label}`.trimEnd());
  }
  lines.push('', 'UNITS AND GRID', '');
  lines.push(`Wavelength λ = ${input.wavelengthNm} nm; lattice period P = ${input.periodNm} nm; N = ${input.cells} cells a side (${side} µm).`);
  lines.push('Cell (ix, iy) sits at x = (ix − (N−1)/2)·P, y = (iy − (N−1)/2)·P; arrays are row-major [iy, ix].');
  lines.push('Phases and angles in the arrays are radians; in design.json angles are degrees. Time dependence exp(−iωt).');
  lines.push('', 'LAYOUT AND ORIENTATION', '');
  lines.push(
    `layout.gds: user unit 1 µm, database unit ${input.gds.dbUnitNm} nm, pillars on layer ${input.gds.layer}, datatype ${input.gds.datatype}` +
      `${input.gds.regenerated ? ' (regenerated for these options from the stored atom placements)' : ''}.`,
  );
  lines.push('One structure per atom used, placed at the cell centres above; a rotation θ is counter-clockwise, in degrees, θ mod 180°.');
  lines.push('Frame: x to the right and y up, seen facing the device from the side the light goes to (the light travels');
  lines.push('along +z towards you; (x, y, z) right-handed; the GDSII layout seen from above its pillars). The layout, the');
  lines.push('maps and the far-field previews all use this frame, and a target picture appears upright in it (as on a');
  lines.push('translucent screen seen from behind, or a camera facing the device); looking along the light at a wall shows');
  lines.push('it mirrored left to right. See "Picture convention" in Phasewright\'s README. Far-field previews: u = sin θx');
  lines.push('to the right, v = sin θy up, zero order at the centre.');
  lines.push('', 'ATOM LIBRARY', '');
  lines.push(`${input.library.name}${input.library.source ? ` — source: ${input.library.source}` : ''}.`);
  lines.push(
    input.library.approximate
      ? 'APPROXIMATE: its transmissions come from a simple model, not from full-wave simulations of your process. Check the design against your own data before fabrication.'
      : /^RCWA /.test(input.library.source ?? '')
        ? 'Not approximate: computed in Phasewright by rigorous coupled-wave analysis with the parameters in its source line above; it is only as good as the material indices and the number of harmonics it was computed with.'
        : 'Marked by its uploader as not approximate; it is only as good as the simulations or measurements behind it.',
  );
  lines.push('', 'CAUTIONS', '');
  lines.push(`Laser safety: ${LASER_SAFETY_CAUTION}`);
  lines.push(`Fabrication: ${FABRICATION_CAUTION}`);
  lines.push('Your lab\'s and cleanroom\'s own rules come first; nothing in this package replaces them.');
  return lines.join('\n') + '\n';
}
