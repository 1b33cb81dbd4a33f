import { RungsInputError } from '../errors.ts';
import type { Mesh } from './types.ts';

/** Index of a boundary tag; throws RungsInputError naming the unknown tag and listing the mesh's tags. */
export function tagIndex(mesh: Mesh, name: string): number {
  const index = mesh.tagNames.indexOf(name);
  if (index < 0) {
    const known = mesh.tagNames.length > 0 ? mesh.tagNames.map((t) => `'${t}'`).join(', ') : '(none)';
    throw new RungsInputError(`unknown boundary tag '${name}'; this mesh has the tags ${known}`, 'boundary tag');
  }
  return index;
}

/** Indices (ascending) of the boundary facets carrying any of the given tags; every name must exist. */
export function facetsWithTags(mesh: Mesh, names: readonly string[]): Int32Array {
  const wanted = new Uint8Array(mesh.tagNames.length);
  for (const name of names) wanted[tagIndex(mesh, name)] = 1;
  let count = 0;
  for (let f = 0; f < mesh.nFacets; f++) if (wanted[mesh.facetTags[f]!]) count++;
  const selected = new Int32Array(count);
  let k = 0;
  for (let f = 0; f < mesh.nFacets; f++) if (wanted[mesh.facetTags[f]!]) selected[k++] = f;
  return selected;
}
