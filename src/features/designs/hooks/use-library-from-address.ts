import { useEffect } from 'react';
import { useSearchParams } from 'react-router-dom';
import { libraryMedia } from '@shared/optics/atoms';
import { useDesignAtomLibraries } from '@/features/designs/api/get-atom-libraries';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { focusField } from '@/features/designs/utils/focus-field';

/**
 * `?library=7` in the composer's address (from a library build's "Use in a design"): once the design is open,
 * chooses stored library 7 and, when the project sees it, takes its wavelength and period (a design must match
 * its library's) and the side its light came from (when its source line says), then drops the parameter so a
 * reload keeps the user's later edits; the library picker gets the focus.
 */
export function useLibraryFromAddress(projectId: number, sourceKey: string) {
  const [search, setSearch] = useSearchParams();
  const text = search.get('library');
  const wanted = text && /^[1-9][0-9]{0,9}$/.test(text) ? Number(text) : null;
  const ready = useDesignEditor((state) => state.sourceKey === sourceKey && state.draft !== null);
  const setField = useDesignEditor((state) => state.setField);
  const libraries = useDesignAtomLibraries(projectId);

  useEffect(() => {
    if (text === null || !ready || libraries.isPending) return;
    const library = wanted === null ? undefined : libraries.data?.find((l) => l.id === wanted);
    if (wanted !== null) setField(['atomLibrary'], { source: 'library', id: wanted });
    if (library) {
      setField(['setup', 'wavelengthNm'], library.wavelengthNm);
      setField(['setup', 'periodNm'], library.periodNm);
      const { lightFrom } = libraryMedia(library);
      if (lightFrom) setField(['setup', 'lightFrom'], lightFrom);
    }
    if (wanted !== null) window.requestAnimationFrame(() => focusField('atomLibrary'));
    setSearch(
      (previous) => {
        const next = new URLSearchParams(previous);
        next.delete('library');
        return next;
      },
      { replace: true },
    );
  }, [text, wanted, ready, libraries.isPending, libraries.data, setField, setSearch]);
}
