// Relative, not '@shared/…': the unit tests import this file under the server's compiler settings.
import { PHASE_TERM_LABELS } from '../../../../shared/schemas/design';

/** What a label is made from: a term's kind and, for a hologram, its picture (DraftTerm fits). */
interface LabelTerm {
  kind: keyof typeof PHASE_TERM_LABELS;
  image?: { source: string; name?: string };
}

interface LabelledChannel {
  label?: string;
  terms: readonly LabelTerm[];
}

/** A demo picture's name as a person reads it. Example: 'compass-rose' → 'Compass rose'. */
function demoName(name: string): string {
  const words = name.replace(/-/g, ' ');
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/**
 * The label a channel gets from its terms when nobody typed one: the demo picture of a hologram, otherwise the
 * kinds of its terms. Example: [vortex, tilt] → 'Vortex + tilt'; [hologram of the demo lighthouse] → 'Lighthouse'.
 */
export function autoLabel(terms: readonly LabelTerm[]): string {
  const parts = terms.map((term) => {
    if (term.kind === 'hologram' && term.image?.source === 'demo' && term.image.name) return demoName(term.image.name);
    return PHASE_TERM_LABELS[term.kind];
  });
  const text = parts.join(' + ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/**
 * The channel's label after its terms change: a label that was filled in automatically (it equals the label its
 * old terms give) follows the new terms — so removing the demo picture does not leave "Lighthouse" behind; a label
 * a person typed, or none, stays as it is.
 * Example: label 'Lighthouse', terms [lighthouse hologram] → [] gives ''; label 'My beam' stays 'My beam'.
 */
export function followLabel(channel: LabelledChannel, nextTerms: readonly LabelTerm[]): string | undefined {
  const label = channel.label?.trim() ?? '';
  if (label === '' || label !== autoLabel(channel.terms)) return channel.label;
  return autoLabel(nextTerms);
}
