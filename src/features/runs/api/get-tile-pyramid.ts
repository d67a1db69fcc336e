import { useQuery } from '@tanstack/react-query';
import type { TilePyramid } from '@shared/schemas/tiles';
import { ApiError } from '@/lib/api-client';
import type { TileSource } from '@/components/ui/tile-layer';
import { useArtifactAddress } from '@/features/runs/api/artifact-url-context';
import { runKeys } from '@/features/runs/api/query-keys';

/**
 * The tile pyramid of a run's preview (README "Tile pyramids") when the run has one (`tiled`): its manifest,
 * fetched once. Undefined while it loads, and for previews without one or when it fails — the figure then
 * shows the single PNG.
 */
export function useTileSource(projectId: number, runId: number, name: string, tiled: boolean): { source: TileSource | undefined; settled: boolean } {
  const base = useArtifactAddress(projectId, runId).tiles(name);
  const query = useQuery({
    queryKey: [...runKeys.artifact(projectId, runId, name), 'tiles', base] as const,
    queryFn: async ({ signal }) => {
      const response = await fetch(base, { credentials: 'same-origin', signal });
      if (!response.ok) throw new ApiError(response.status, `The tiles of ${name} did not load (the server answered ${response.status})`);
      return ((await response.json()) as { tiles: TilePyramid }).tiles;
    },
    enabled: tiled,
    staleTime: Infinity,
    retry: 1,
  });
  const pyramid = query.data;
  return {
    source: pyramid ? { pyramid, tile: (level, x, y) => `${base}/${level}/${x}/${y}` } : undefined,
    settled: !tiled || query.isSuccess || query.isError,
  };
}
