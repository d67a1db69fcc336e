/** Channel labels filled in automatically follow the channel's terms; typed ones stay. */
import { describe, expect, it } from 'vitest';
import { autoLabel, followLabel } from '../../src/features/designs/utils/channel-labels';

// Terms as the composer makes them (design-draft.ts newTerm), reduced to what a label reads.
const newTerm = (kind: 'hologram' | 'lens' | 'vortex' | 'tilt', channel: 'a' | 'b') =>
  kind === 'hologram' ? { kind, image: { source: 'demo', name: channel === 'a' ? 'lighthouse' : 'compass-rose' } } : { kind };
// The template's channels (design-draft.ts designTemplate).
const designTemplate = (_name: string) => ({
  channels: { a: { label: 'Lighthouse', terms: [newTerm('hologram', 'a')] }, b: { label: 'Compass rose', terms: [newTerm('hologram', 'b')] } },
});

describe('channel labels', () => {
  it('the template labels are the automatic ones of its demo pictures', () => {
    const template = designTemplate('Project');
    expect(template.channels.a.label).toBe(autoLabel(template.channels.a.terms));
    expect(template.channels.b.label).toBe(autoLabel(template.channels.b.terms));
  });

  it('removing the demo picture takes its label with it; a new term names the channel', () => {
    const channel = designTemplate('Project').channels.a;
    expect(channel.label).toBe('Lighthouse');
    expect(followLabel(channel, [])).toBe('');
    expect(followLabel(channel, [newTerm('lens', 'a')])).toBe('Lens');
    expect(followLabel({ label: 'Vortex', terms: [newTerm('vortex', 'b')] }, [newTerm('vortex', 'b'), newTerm('tilt', 'b')])).toBe('Vortex + tilt');
  });

  it('a label someone typed, or none, is left alone', () => {
    const typed = { label: 'Lighthouse under left-circular light', terms: [newTerm('hologram', 'a')] };
    expect(followLabel(typed, [])).toBe('Lighthouse under left-circular light');
    expect(followLabel({ label: '', terms: [newTerm('lens', 'a')] }, [])).toBe('');
    expect(followLabel({ terms: [newTerm('lens', 'a')] }, [])).toBeUndefined();
  });
});
