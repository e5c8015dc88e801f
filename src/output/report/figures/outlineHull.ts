/**
 * The outline drawn around the regions of an anatomical view: the convex hull
 * of the regions' projected positions, grown outward by a margin with rounded
 * corners (the hull's Minkowski sum with a disc), so every region lies inside
 * it at least `margin` from its edge. It is drawn from the user's own region
 * coordinates only: no atlas or template. Plain plane geometry on points.
 */
export type Point = readonly [number, number];

/** The convex hull, counter-clockwise in a y-up frame, without collinear points (Andrew's monotone chain, Andrew 1979, Inf. Process. Lett. 9:216). */
export function convexHull(points: readonly Point[]): Point[] {
  const sorted = [...points].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const unique = sorted.filter((p, k) => k === 0 || p[0] !== sorted[k - 1][0] || p[1] !== sorted[k - 1][1]);
  if (unique.length < 3) return unique;
  const cross = (o: Point, a: Point, b: Point) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
  const lower: Point[] = [];
  for (const p of unique) {
    while (lower.length >= 2 && cross(lower[lower.length - 2], lower[lower.length - 1], p) <= 0) lower.pop();
    lower.push(p);
  }
  const upper: Point[] = [];
  for (let k = unique.length - 1; k >= 0; k--) {
    const p = unique[k];
    while (upper.length >= 2 && cross(upper[upper.length - 2], upper[upper.length - 1], p) <= 0) upper.pop();
    upper.push(p);
  }
  return [...lower.slice(0, -1), ...upper.slice(0, -1)];
}

/**
 * The hull grown by `margin`: a closed polygon (counter-clockwise in a y-up
 * frame) whose straight sides are the hull's sides moved outward and whose
 * corners are circular arcs of radius `margin` around the hull's vertices,
 * sampled at most `step` radians apart. One point or two give a disc or a
 * capsule.
 */
export function roundedHull(points: readonly Point[], margin: number, step = Math.PI / 18): Point[] {
  const hull = convexHull(points);
  if (hull.length === 0) return [];
  const outline: Point[] = [];
  const arc = (centre: Point, from: number, to: number) => {
    let sweep = to - from;
    while (sweep < 0) sweep += 2 * Math.PI;
    const count = Math.max(1, Math.ceil(sweep / step));
    for (let k = 0; k <= count; k++) {
      const angle = from + (sweep * k) / count;
      outline.push([centre[0] + margin * Math.cos(angle), centre[1] + margin * Math.sin(angle)]);
    }
  };
  if (hull.length === 1) {
    arc(hull[0], 0, 2 * Math.PI - step);
    return outline;
  }
  // The outward normal of side p→q of a counter-clockwise polygon points to its right: angle of (q − p) minus 90°.
  const normal = (p: Point, q: Point) => Math.atan2(q[1] - p[1], q[0] - p[0]) - Math.PI / 2;
  const count = hull.length;
  for (let k = 0; k < count; k++) {
    const previous = hull[(k - 1 + count) % count];
    const vertex = hull[k];
    const next = hull[(k + 1) % count];
    arc(vertex, normal(previous, vertex), normal(vertex, next));
  }
  return outline;
}

/** Whether `point` lies inside (or on) a convex polygon listed counter-clockwise in a y-up frame. */
export function insideConvex(polygon: readonly Point[], point: Point, tolerance = 1e-9): boolean {
  for (let k = 0; k < polygon.length; k++) {
    const a = polygon[k];
    const b = polygon[(k + 1) % polygon.length];
    if ((b[0] - a[0]) * (point[1] - a[1]) - (b[1] - a[1]) * (point[0] - a[0]) < -tolerance) return false;
  }
  return true;
}

/** Where the vertical line at `x` enters and leaves a closed polygon: [lowest, highest] y, or null when it misses. */
export function verticalSpan(polygon: readonly Point[], x: number): [number, number] | null {
  let low = Infinity;
  let high = -Infinity;
  for (let k = 0; k < polygon.length; k++) {
    const a = polygon[k];
    const b = polygon[(k + 1) % polygon.length];
    if ((a[0] - x) * (b[0] - x) > 0 || a[0] === b[0]) continue;
    const y = a[1] + ((x - a[0]) / (b[0] - a[0])) * (b[1] - a[1]);
    low = Math.min(low, y);
    high = Math.max(high, y);
  }
  return low <= high ? [low, high] : null;
}
