/**
 * GDSII read back with the independent `gdsii` npm parser (not our writer's code): structures with their
 * BOUNDARY and SREF elements, per the GDSII Stream Format Manual release 6.0 record types.
 */
import { parseGDS, RecordType } from 'gdsii';
import type { GDSRecord } from 'gdsii';

export interface GdsPlacement {
  name: string;
  x: number;
  y: number;
  angle: number;
  /** STRANS flags; 0 when the record is absent. */
  strans: number;
}

export interface GdsStructure {
  boundaries: { layer: number; datatype: number; xy: [number, number][] }[];
  srefs: GdsPlacement[];
}

export interface GdsReadBack {
  header: number;
  units: { userUnit: number; metersPerUnit: number };
  structures: Map<string, GdsStructure>;
  lastTag: number;
}

export function readGdsLayout(bytes: Uint8Array): GdsReadBack {
  const out: GdsReadBack = { header: 0, units: { userUnit: 0, metersPerUnit: 0 }, structures: new Map(), lastTag: -1 };
  let current: GdsStructure | undefined;
  let element: { kind: 'boundary' | 'sref'; layer?: number; datatype?: number; name?: string; angle?: number; strans?: number; xy?: [number, number][] } | undefined;
  for (const r of parseGDS(bytes) as Iterable<GDSRecord>) {
    out.lastTag = r.tag;
    switch (r.tag) {
      case RecordType.HEADER:
        out.header = r.data.version;
        break;
      case RecordType.UNITS:
        out.units = r.data;
        break;
      case RecordType.STRNAME:
        current = { boundaries: [], srefs: [] };
        out.structures.set(r.data, current);
        break;
      case RecordType.BOUNDARY:
        element = { kind: 'boundary' };
        break;
      case RecordType.SREF:
        element = { kind: 'sref' };
        break;
      case RecordType.LAYER:
        element!.layer = r.data;
        break;
      case RecordType.DATATYPE:
        element!.datatype = r.data;
        break;
      case RecordType.SNAME:
        element!.name = r.data;
        break;
      case RecordType.STRANS:
        element!.strans = r.data;
        break;
      case RecordType.ANGLE:
        element!.angle = r.data;
        break;
      case RecordType.XY:
        element!.xy = r.data;
        break;
      case RecordType.ENDEL:
        if (element!.kind === 'boundary') current!.boundaries.push({ layer: element!.layer!, datatype: element!.datatype!, xy: element!.xy! });
        else current!.srefs.push({ name: element!.name!, x: element!.xy![0][0], y: element!.xy![0][1], angle: element!.angle ?? 0, strans: element!.strans ?? 0 });
        element = undefined;
        break;
      default:
        break;
    }
  }
  return out;
}

export interface GdsPlacementGrid {
  units: { userUnit: number; metersPerUnit: number };
  /** SREFs of the top structure METASURFACE. */
  placements: number;
  /** Per cell (row-major N×N, iy up): the placed atom k of its `ATOM_<k>` reference, −1 where none. */
  atom: Int32Array;
  /** Per cell: ANGLE of its placement, degrees (0 where the record is absent). */
  angleDeg: Float64Array;
  /** Placements not on a cell centre x = (ix − (N−1)/2)·P, y = (iy − (N−1)/2)·P. */
  offGrid: number;
  /** Placements on a cell that already had one. */
  repeated: number;
}

/**
 * The placements of a layout of N×N cells of period P read with the independent parser, one record at a time
 * into per-cell arrays (a 4096² layout has 16.7 M placements: too many to keep as objects).
 */
export function countGdsPlacements(bytes: Uint8Array, grid: { n: number; periodNm: number }): GdsPlacementGrid {
  const { n, periodNm } = grid;
  const out: GdsPlacementGrid = { units: { userUnit: 0, metersPerUnit: 0 }, placements: 0, atom: new Int32Array(n * n).fill(-1), angleDeg: new Float64Array(n * n), offGrid: 0, repeated: 0 };
  let inTop = false;
  let sref = false;
  let name = '';
  let angle = 0;
  let xy: [number, number] = [0, 0];
  for (const r of parseGDS(bytes) as Iterable<GDSRecord>) {
    switch (r.tag) {
      case RecordType.UNITS:
        out.units = r.data;
        break;
      case RecordType.STRNAME:
        inTop = r.data === 'METASURFACE';
        break;
      case RecordType.SREF:
        sref = inTop;
        angle = 0;
        break;
      case RecordType.SNAME:
        name = r.data;
        break;
      case RecordType.ANGLE:
        angle = r.data;
        break;
      case RecordType.XY:
        xy = r.data[0];
        break;
      case RecordType.ENDEL:
        if (sref) {
          out.placements++;
          const unitNm = out.units.metersPerUnit * 1e9;
          const fx = (xy[0] * unitNm) / periodNm + (n - 1) / 2;
          const fy = (xy[1] * unitNm) / periodNm + (n - 1) / 2;
          const ix = Math.round(fx);
          const iy = Math.round(fy);
          if (Math.abs(fx - ix) > 1e-6 || Math.abs(fy - iy) > 1e-6 || ix < 0 || iy < 0 || ix >= n || iy >= n) out.offGrid++;
          else {
            const i = iy * n + ix;
            if (out.atom[i] >= 0) out.repeated++;
            out.atom[i] = Number(/^ATOM_(\d+)$/.exec(name)?.[1] ?? -2);
            out.angleDeg[i] = angle;
          }
        }
        sref = false;
        break;
      default:
        break;
    }
  }
  return out;
}
