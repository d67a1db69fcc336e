import type { RunArtifact } from '@shared/schemas/runs';

export type ChannelKey = 'a' | 'b';
export type InputKey = 'a' | 'b' | 'extra';

export interface FarFieldImage {
  artifact: RunArtifact;
  /** Output component the picture shows, as the file name says it ('' for the total). */
  component: string;
}

export type MapKind = 'phase' | 'cell-phase' | 'rotation' | 'index';

export interface MapImage {
  artifact: RunArtifact;
  kind: MapKind;
  channel: ChannelKey | null;
}

/** The run's files sorted into the parts of the run page; anything unrecognised still gets a place. */
export interface ArtifactGroups {
  farFields: Record<InputKey, FarFieldImage[]>;
  imagePlanes: Partial<Record<ChannelKey, RunArtifact>>;
  /** Pictures meant for a flat screen, as seen there. */
  screens: Partial<Record<ChannelKey, RunArtifact>>;
  maps: MapImage[];
  /** δx / δy stored only as .npy arrays: the page draws them itself. */
  arrayMaps: RunArtifact[];
  slices: Partial<Record<ChannelKey, RunArtifact>>;
  otherImages: RunArtifact[];
  downloads: { title: string; description: string; files: RunArtifact[] }[];
}

const isImage = (artifact: RunArtifact) => artifact.mime.startsWith('image/') || /\.(png|jpe?g|webp|svg)$/i.test(artifact.name);
const stem = (name: string) => name.replace(/\.[^.]+$/, '').toLowerCase();

const FAR_FIELD = /^far[_-]?field[_-]?(a|b|extra)(?:[_-](.+))?$/;
const IMAGE_PLANE = /^image[_-]?plane[_-]?(a|b)$/;
const SCREEN = /^screen[_-]?(a|b)$/;
const PHASE = /^phase[_-]?(a|b)$/;
const CELL_PHASE = /^(delta[_-]?x|delta[_-]?y|dx|dy)$/;
const ROTATION = /^(theta|rotation)$/;
const INDEX = /^atom[_-]?index$/;
const SLICE = /^(?:xz|x[_-]z|slice)[_-]?(a|b)$/;

/** Component order: total first, then the two analyser states, then x and y, then anything else by name. */
function componentRank(component: string): number {
  if (component === '' || component === 'total') return 0;
  if (/(^|[_-])a$/.test(component)) return 1;
  if (/(^|[_-])b$/.test(component)) return 2;
  if (component === 'x') return 3;
  if (component === 'y') return 4;
  return 5;
}

const DOWNLOAD_KINDS: { title: string; description: string; test: (a: RunArtifact) => boolean }[] = [
  { title: 'Layout', description: 'GDSII stream for the e-beam writer', test: (a) => /\.gds(ii)?$/i.test(a.name) },
  { title: 'Arrays', description: 'numpy .npy, N×N, readable with numpy.load', test: (a) => /\.npy$/i.test(a.name) },
  {
    title: 'Records',
    description: 'design, metrics and the atom library used',
    test: (a) => /\.(json|csv|txt)$/i.test(a.name) || a.mime.includes('json') || a.mime.startsWith('text/'),
  },
  { title: 'Previews', description: 'PNG pictures as shown on this page', test: isImage },
];

export function groupArtifacts(artifacts: RunArtifact[]): ArtifactGroups {
  const groups: ArtifactGroups = {
    farFields: { a: [], b: [], extra: [] },
    imagePlanes: {},
    screens: {},
    maps: [],
    arrayMaps: [],
    slices: {},
    otherImages: [],
    downloads: [],
  };
  for (const artifact of artifacts) {
    if (!isImage(artifact)) continue;
    const name = stem(artifact.name);
    let match: RegExpExecArray | null;
    if ((match = FAR_FIELD.exec(name))) groups.farFields[match[1] as InputKey].push({ artifact, component: match[2] ?? '' });
    else if ((match = IMAGE_PLANE.exec(name))) groups.imagePlanes[match[1] as ChannelKey] = artifact;
    else if ((match = SCREEN.exec(name))) groups.screens[match[1] as ChannelKey] = artifact;
    else if ((match = PHASE.exec(name))) groups.maps.push({ artifact, kind: 'phase', channel: match[1] as ChannelKey });
    else if (CELL_PHASE.test(name)) groups.maps.push({ artifact, kind: 'cell-phase', channel: null });
    else if (ROTATION.test(name)) groups.maps.push({ artifact, kind: 'rotation', channel: null });
    else if (INDEX.test(name)) groups.maps.push({ artifact, kind: 'index', channel: null });
    else if ((match = SLICE.exec(name))) groups.slices[match[1] as ChannelKey] = artifact;
    else groups.otherImages.push(artifact);
  }
  for (const list of Object.values(groups.farFields)) {
    list.sort((p, q) => componentRank(p.component) - componentRank(q.component) || p.component.localeCompare(q.component));
  }
  const pictured = new Set(groups.maps.filter((m) => m.kind === 'cell-phase').map((m) => stem(m.artifact.name).replace(/[_-]/g, '')));
  groups.arrayMaps = artifacts
    .filter((a) => /\.npy$/i.test(a.name) && CELL_PHASE.test(stem(a.name)) && !pictured.has(stem(a.name).replace(/[_-]/g, '')))
    .sort((p, q) => p.name.localeCompare(q.name));
  const order: MapKind[] = ['phase', 'cell-phase', 'rotation', 'index'];
  groups.maps.sort((p, q) => order.indexOf(p.kind) - order.indexOf(q.kind) || p.artifact.name.localeCompare(q.artifact.name));

  const placed = new Set<RunArtifact>();
  for (const kind of DOWNLOAD_KINDS) {
    const files = artifacts.filter((a) => !placed.has(a) && kind.test(a));
    files.forEach((a) => placed.add(a));
    if (files.length) groups.downloads.push({ title: kind.title, description: kind.description, files });
  }
  const rest = artifacts.filter((a) => !placed.has(a));
  if (rest.length) groups.downloads.push({ title: 'Other files', description: 'further results of this run', files: rest });
  return groups;
}

/**
 * A readable name for a far-field component taken from a file name part: "" or "total", "out-a" / "out-b"
 * (or any part ending in a or b: the output state of that channel, λA* or λB*), "x" or "y".
 */
export function componentName(component: string, channelNames: Record<ChannelKey, string>): string {
  if (component === '' || component === 'total') return 'Total (both output components)';
  if (component === 'x' || component === 'y') return `${component}-polarized part`;
  const state = /(^|[_-])(a|b)$/.exec(component);
  if (state) {
    const c = state[2] as ChannelKey;
    return `Part in the output state of ${channelNames[c]} (λ${c.toUpperCase()}*)`;
  }
  return component.replace(/[_-]+/g, ' ');
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1 << 20) return `${(bytes / (1 << 20)).toFixed(1)} MiB`;
  if (bytes >= 1 << 10) return `${(bytes / (1 << 10)).toFixed(1)} KiB`;
  return `${bytes} B`;
}
