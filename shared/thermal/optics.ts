/** Geometric spot size of one pixel at a distance, mm (IFOV in mrad × distance in m, small-angle). */
export function spotSizeMm(ifovMrad: number, distanceM: number): number {
  return ifovMrad * distanceM
}

/** How many pixels a target of `targetMm` spans across at this distance. */
export function pixelsAcross(targetMm: number, ifovMrad: number, distanceM: number): number {
  const spot = spotSizeMm(ifovMrad, distanceM)
  return spot > 0 ? targetMm / spot : Number.POSITIVE_INFINITY
}

/**
 * True when the target covers at least minPixels × minPixels pixels (the 3 × 3 rule, common practice):
 * smaller targets read low because the optics blur them into their surroundings.
 */
export function targetCoversPixels(targetMm: number, ifovMrad: number, distanceM: number, minPixels = 3): boolean {
  // The relative allowance keeps a target of exactly minPixels (e.g. 40.8 mm at 13.6 mm per pixel) from
  // failing on binary rounding.
  return pixelsAcross(targetMm, ifovMrad, distanceM) >= minPixels * (1 - 1e-9)
}

/** Farthest distance, m, at which a target still covers minPixels across. */
export function maxDistanceForTargetM(targetMm: number, ifovMrad: number, minPixels = 3): number {
  return targetMm / (ifovMrad * minPixels)
}
