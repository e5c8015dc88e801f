/**
 * Edge order used everywhere: the row-major upper triangle (i < j) of an
 * N × N matrix, so edge 0 is (0,1), edge 1 is (0,2), …, edge N-2 is (0,N-1),
 * edge N-1 is (1,2). `regionA` is always the region with the lower index.
 */
export function edgeCountFor(regionCount: number): number {
  return (regionCount * (regionCount - 1)) / 2;
}

export interface EdgePairs {
  regionCount: number;
  edgeCount: number;
  /** Lower region index of each edge. */
  regionA: Uint32Array;
  /** Higher region index of each edge. */
  regionB: Uint32Array;
}

export function edgePairs(regionCount: number): EdgePairs {
  const edgeCount = edgeCountFor(regionCount);
  const regionA = new Uint32Array(edgeCount);
  const regionB = new Uint32Array(edgeCount);
  let e = 0;
  for (let i = 0; i < regionCount; i++) {
    for (let j = i + 1; j < regionCount; j++) {
      regionA[e] = i;
      regionB[e] = j;
      e++;
    }
  }
  return { regionCount, edgeCount, regionA, regionB };
}

/** Index of edge (i, j) in the row-major upper triangle; i and j in either order, i ≠ j. */
export function edgeIndexOf(regionCount: number, i: number, j: number): number {
  const a = Math.min(i, j);
  const b = Math.max(i, j);
  return a * regionCount - (a * (a + 1)) / 2 + (b - a - 1);
}
