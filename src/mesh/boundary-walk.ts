/** Boundary facets of a structured grid region whose boundary is one closed polygon along grid lines. */
export interface WalkedBoundary {
  facets: Int32Array;
  facetTags: Int32Array;
}

/** Walks the closed polygon through corners (grid indices (i, j), counter-clockwise so the domain is on the left)
 *  one grid edge at a time; side k runs from corners[k] to corners[k + 1] (the last back to the first) and gets
 *  sideTags[k]. Sides must be horizontal or vertical. */
export function walkGridBoundary(
  corners: ReadonlyArray<readonly [number, number]>,
  sideTags: readonly number[],
  vertexAt: (i: number, j: number) => number,
): WalkedBoundary {
  let nFacets = 0;
  for (let k = 0; k < corners.length; k++) {
    const [i0, j0] = corners[k]!;
    const [i1, j1] = corners[(k + 1) % corners.length]!;
    nFacets += Math.abs(i1 - i0) + Math.abs(j1 - j0);
  }
  const facets = new Int32Array(2 * nFacets);
  const facetTags = new Int32Array(nFacets);
  let f = 0;
  for (let k = 0; k < corners.length; k++) {
    const [i0, j0] = corners[k]!;
    const [i1, j1] = corners[(k + 1) % corners.length]!;
    const di = Math.sign(i1 - i0);
    const dj = Math.sign(j1 - j0);
    const steps = Math.abs(i1 - i0) + Math.abs(j1 - j0);
    for (let s = 0; s < steps; s++) {
      facets[2 * f] = vertexAt(i0 + s * di, j0 + s * dj);
      facets[2 * f + 1] = vertexAt(i0 + (s + 1) * di, j0 + (s + 1) * dj);
      facetTags[f] = sideTags[k]!;
      f++;
    }
  }
  return { facets, facetTags };
}
