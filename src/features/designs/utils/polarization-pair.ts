import { polarizationPair, type PolarizationPair } from '@shared/optics/polarization';
import type { DesignDraft } from '@/features/designs/utils/design-draft';

const DEG = Math.PI / 180;

/** The Jones pair of a draft's polarization, or null while its numbers do not describe one. */
export function draftPolarizationPair(polarization: DesignDraft['polarization'] | undefined): PolarizationPair | null {
  if (!polarization) return null;
  try {
    switch (polarization.kind) {
      case 'linear':
        return polarizationPair({ kind: 'linear', angle: (polarization.angleDeg ?? 0) * DEG });
      case 'circular':
        return polarizationPair({ kind: 'circular', handedness: polarization.handedness });
      case 'elliptical':
        return polarizationPair({ kind: 'elliptical', psi: polarization.psiDeg * DEG, chi: polarization.chiDeg * DEG });
    }
  } catch {
    return null;
  }
}
