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
  // The previous foot and its geophone's x, as numbers (no object per geophone).
  let havePrevious = false;
  let previousFootX = 0;
  let previousFootZ = 0;
  let previousX = 0;
  const out: (number | null)[] = new Array<number | null>(feet.length);
  for (let i = 0; i < feet.length; i++) {
    const f = feet[i];
    if (f === null) {
      out[i] = null;
      continue;
    }
    if (havePrevious) {
      let across = false;
      for (const x of stepXsM) if ((previousX - x) * (xsM[i] - x) <= 0) across = true;
      const dx = f.xM - previousFootX;
      const dz = across ? 0 : f.elevationM - previousFootZ;
      s += Math.sign(dx || 1) * Math.hypot(dx, dz);
    }
    havePrevious = true;
    previousFootX = f.xM;
    previousFootZ = f.elevationM;
    previousX = xsM[i];
    out[i] = s;
  }
  return out;
}
