import { queryOptions, useQuery } from '@tanstack/react-query';
import { paintPhase, subsampleMap, upright as uprightPicture } from '@shared/optics/colormap';
import { decodeNpy } from '@shared/optics/npy-decode';
import { ApiError } from '@/lib/api-client';
import { useArtifactAddress } from '@/features/runs/api/artifact-url-context';
import { runKeys } from '@/features/runs/api/query-keys';

const MAX_SIDE = 1024;

/**
 * Fetches an N×N phase array (.npy, radians) of a run and paints it in the cyclic colours as a PNG, for
 * maps the run stores only as arrays (δx, δy). Large arrays are sampled down to at most 1024 per side.
 * `upright`: the last array row (the largest y) at the top, as README "Picture convention" paints previews.
 */
export async function getArrayPicture(href: string, name: string, signal?: AbortSignal, upright = true): Promise<Blob> {
  const response = await fetch(href, { credentials: 'same-origin', signal });
  if (!response.ok) throw new ApiError(response.status, `The file ${name} did not load (the server answered ${response.status})`);
  const array = decodeNpy(new Uint8Array(await response.arrayBuffer()));
  const [rows, cols] = array.shape;
  if (array.shape.length !== 2 || rows !== cols || !(array.data instanceof Float64Array || array.data instanceof Float32Array)) {
    throw new ApiError(0, `${name} is not a square map of phases`);
  }
  let factor = 1;
  while (rows / factor > MAX_SIDE && rows % (factor * 2) === 0) factor *= 2;
  const side = rows / factor;
  const values = factor > 1 ? subsampleMap(array.data, rows, factor) : array.data;
  const painted = paintPhase(values, side, side);
  const image = upright ? uprightPicture(painted) : painted;
  const canvas = document.createElement('canvas');
  canvas.width = side;
  canvas.height = side;
  canvas.getContext('2d')!.putImageData(new ImageData(image.data as Uint8ClampedArray<ArrayBuffer>, side, side), 0, 0);
  return new Promise((resolve, reject) =>
    canvas.toBlob((blob) => (blob ? resolve(blob) : reject(new ApiError(0, `Could not draw ${name}`))), 'image/png'),
  );
}

export function arrayPictureQueryOptions(projectId: number, runId: number, name: string, href: string, upright = true) {
  return queryOptions({
    queryKey: [...runKeys.artifact(projectId, runId, name), 'picture', href, upright] as const,
    queryFn: ({ signal }) => getArrayPicture(href, name, signal, upright),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
  });
}

export function useArrayPicture(projectId: number, runId: number, name: string, enabled: boolean, upright = true) {
  const href = useArtifactAddress(projectId, runId).href(name);
  return useQuery({ ...arrayPictureQueryOptions(projectId, runId, name, href, upright), enabled });
}
