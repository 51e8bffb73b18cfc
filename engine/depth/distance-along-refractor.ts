/**
 * Distance along the refractor to each geophone's foot (where its depth arc touches the
 * refractor), m: the abscissa against which T− is straight whatever the dip.
 */

/**
 * Distance along the polyline through the feet in line order (only differences matter);
 * null where there is no foot. T− rises by 2/V2 per metre of this distance (Hagedoorn 1959),
 * exactly so over a plane whatever the dip and the ground slope; per metre along the line
 * it rises by 2·(cos θ − g·sin θ)/V2 for dip θ and ground gradient g. Across a step the head
 * wave does not run down the step face, so only the horizontal distance counts there.
 * Cost: O(geophones · steps).
 */
export function distanceAlongRefractorM(feet: ({ xM: number; elevationM: number } | null)[], xsM: number[], stepXsM: number[]): (number | null)[] {
  let s = 0;
  let previous: { xM: number; elevationM: number; x: number } | null = null;
  return feet.map((f, i) => {
    if (f === null) return null;
    if (previous) {
      const across = stepXsM.some((x) => (previous!.x - x) * (xsM[i] - x) <= 0);
      const dz = across ? 0 : f.elevationM - previous.elevationM;
      s += Math.sign(f.xM - previous.xM || 1) * Math.hypot(f.xM - previous.xM, dz);
    }
    previous = { ...f, x: xsM[i] };
    return s;
  });
}
