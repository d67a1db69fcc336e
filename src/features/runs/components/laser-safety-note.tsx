import { Banner } from '@/components/ui/banner';

export const LASER_SAFETY_TEXT =
  'Focused and Bessel beams concentrate laser power. Follow ANSI Z136.1 / IEC 60825-1 and your institution’s laser safety officer.';

export function LaserSafetyNote({ className = '' }: { className?: string }) {
  return (
    <Banner tone="warning" title="Laser safety" className={className}>
      {LASER_SAFETY_TEXT}
    </Banner>
  );
}
