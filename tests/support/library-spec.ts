/** The problems `parseLibrarySpec` finds in a spec that it refuses (fails the test when the spec is accepted). */
import { expect } from 'vitest';
import { LibrarySpecError, parseLibrarySpec, type SpecOptions, type SpecProblem } from '../../shared/optics/library-builder';

export function specProblems(raw: unknown, options: SpecOptions = {}): SpecProblem[] {
  try {
    parseLibrarySpec(raw, options);
  } catch (error) {
    expect(error).toBeInstanceOf(LibrarySpecError);
    return (error as LibrarySpecError).problems;
  }
  throw new Error('the spec was accepted');
}
