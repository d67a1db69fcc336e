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
