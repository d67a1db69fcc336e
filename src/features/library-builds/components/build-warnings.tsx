import { Banner } from '@/components/ui/banner';

/** The server's remarks on a spec (lattice diffraction with its numbers, too few atoms), each as it says it. */
export function BuildWarnings({ warnings, title }: { warnings: string[]; title: string }) {
  const diffracts = warnings.some((w) => /diffracts/.test(w));
  return (
    <Banner tone="warning" title={title}>
      <ul className="list-disc pl-5">
        {warnings.map((w) => (
          <li key={w}>{w}</li>
        ))}
      </ul>
      {diffracts ? <p className="mt-1">The library keeps the zeroth order only; light the lattice sends elsewhere is lost to the design. A smaller period avoids it.</p> : null}
    </Banner>
  );
}
