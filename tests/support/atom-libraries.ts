/** Small atom-library CSV files and an upload helper for the API tests. */
import { atomLibraryToCsv, type AtomLibrary, type MetaAtom } from '../../shared/optics/atoms';
import type { ApiClient } from './test-app';

/**
 * Eight lossy pillars with phases 0, π/4, … 7π/4 on x and shifted by 3π/4 on y: the smallest library
 * that passes the 2π/8 coverage rule (shared/optics/atoms.ts). λ 800 nm, P 400 nm, H 600 nm.
 */
export function eightAtomLibrary(name = 'Eight test pillars'): AtomLibrary {
  const atoms: MetaAtom[] = [];
  for (let i = 0; i < 8; i++) {
    atoms.push({
      id: `p${i}`,
      shape: 'rect',
      width: (100 + 20 * i) * 1e-9,
      length: 150e-9,
      height: 600e-9,
      period: 400e-9,
      tx: 0.9,
      alphaX: (i * Math.PI) / 4,
      ty: 0.95,
      alphaY: (((i + 3) % 8) * Math.PI) / 4,
    });
  }
  return { name, lambda: 800e-9, period: 400e-9, height: 600e-9, material: 'test pillars', approximate: false, atoms };
}

export function eightAtomCsv(name?: string): string {
  return atomLibraryToCsv(eightAtomLibrary(name));
}

/** POSTs a library CSV with the given form fields (scope defaults to 'project'). */
export function uploadAtomLibrary(client: ApiClient, projectId: number, csv: string | Buffer, fields: Record<string, string> = {}) {
  const req = client.agent.post(`/api/projects/${projectId}/atom-libraries`).set('x-csrf-token', client.csrfToken);
  for (const [key, value] of Object.entries({ scope: 'project', ...fields })) req.field(key, value);
  return req.attach('file', Buffer.isBuffer(csv) ? csv : Buffer.from(csv, 'utf8'), { filename: 'library.csv', contentType: 'text/csv' });
}
