/**
 * Largest-triangle-three-buckets downsampling (Steinarsson 2013,
 * "Downsampling Time Series for Visual Representation", MSc thesis,
 * University of Iceland), for drawing long telemetry traces with a few
 * hundred points without flattening spikes the way averaging or decimation
 * would.
 *
 * The first and last points are always kept. The points between are split
 * into `threshold − 2` equal buckets; from each bucket the point kept is the
 * one forming the largest triangle with the point kept from the previous
 * bucket and the mean of the next bucket.
 */

/** A point of a series to plot. */
export interface XY {
  x: number;
  y: number;
}

function checkThreshold(threshold: number): void {
  if (!Number.isInteger(threshold) || threshold < 3) {
    throw new RangeError(`downsampling threshold must be an integer ≥ 3, got ${threshold}`);
  }
}

/**
 * Indices of the points that LTTB keeps, ascending, from parallel coordinate
 * arrays (for example the `t` and `v` columns of a telemetry channel). All
 * indices are returned when there are no more points than `threshold`.
 * Coordinates must be finite and `xs` ascending.
 *
 * @param threshold number of points wanted, an integer ≥ 3
 * @throws RangeError for a bad threshold or arrays of different lengths
 */
export function lttbIndices(xs: ArrayLike<number>, ys: ArrayLike<number>, threshold: number): number[] {
  checkThreshold(threshold);
  if (xs.length !== ys.length) throw new RangeError('x and y arrays must have the same length');
  const n = xs.length;
  if (n <= threshold) return Array.from({ length: n }, (_, i) => i);

  const kept: number[] = [0];
  const bucketSize = (n - 2) / (threshold - 2);
  let a = 0;
  for (let bucket = 0; bucket < threshold - 2; bucket++) {
    const nextStart = Math.floor((bucket + 1) * bucketSize) + 1;
    const nextEnd = Math.min(Math.floor((bucket + 2) * bucketSize) + 1, n);
    let meanX = 0;
    let meanY = 0;
    for (let j = nextStart; j < nextEnd; j++) {
      meanX += xs[j] as number;
      meanY += ys[j] as number;
    }
    const nextCount = nextEnd - nextStart;
    meanX /= nextCount;
    meanY /= nextCount;

    const ax = xs[a] as number;
    const ay = ys[a] as number;
    const start = Math.floor(bucket * bucketSize) + 1;
    const end = Math.floor((bucket + 1) * bucketSize) + 1;
    let best = start;
    let bestArea = -1;
    for (let j = start; j < end; j++) {
      // Twice the triangle's area; the factor ½ does not change which is largest
      const area = Math.abs((ax - meanX) * ((ys[j] as number) - ay) - (ax - (xs[j] as number)) * (meanY - ay));
      if (area > bestArea) {
        bestArea = area;
        best = j;
      }
    }
    kept.push(best);
    a = best;
  }
  kept.push(n - 1);
  return kept;
}

/**
 * LTTB over point objects, returning the kept points themselves in order.
 * When there are no more points than `threshold` the input array itself is
 * returned.
 *
 * @param threshold number of points wanted, an integer ≥ 3
 * @throws RangeError for a bad threshold
 */
export function lttb<T extends XY>(points: readonly T[], threshold: number): readonly T[] {
  checkThreshold(threshold);
  if (points.length <= threshold) return points;
  const xs = points.map((p) => p.x);
  const ys = points.map((p) => p.y);
  return lttbIndices(xs, ys, threshold).map((i) => points[i] as T);
}
