import { Banner } from '@/components/ui/banner';

export function LaserSafetyNote() {
  return (
    <Banner tone="warning" title="Laser safety">
      Focused and Bessel beams concentrate laser power into small spots and long lines. Follow ANSI Z136.1 / IEC 60825-1 and your
      laser safety officer when you test this device.
    </Banner>
  );
}
