/**
 * Warnings about what the line gives to start from: the method asked for, a top-layer
 * velocity, arrivals on a refractor the two-layer section does not map.
 */
import type { ShotAnalysis, Warning } from '../output/interpretation.js';
import { AVAILABLE_METHODS, type ResolvedOptions } from '../survey/options.js';

/** "method-unavailable" when a method the engine cannot run yet was asked for (validation refuses it before; a direct engine call lands here). */
export function methodWarnings(options: ResolvedOptions): Warning[] {
  if ((AVAILABLE_METHODS as readonly string[]).includes(options.method)) return [];
  return [
    {
      code: 'method-unavailable',
      message: `The ${options.method} method is not available yet; the line was interpreted by the plus-minus method.`,
    },
  ];
}

/** "no-direct-velocity" without V1; "second-refractor-not-mapped" for shots with branch-2 arrivals. */
export function branchWarnings(v1: number | null, shots: ShotAnalysis[]): Warning[] {
  const out: Warning[] = [];
  if (v1 === null) {
    out.push({
      code: 'no-direct-velocity',
      message: 'No direct-wave branch was found on any shot, so the top-layer velocity V1 and all depths are unknown. Check that the shots near the spread have picks close to the shot.',
    });
  }
  const withSecond = shots.filter((s) => s.branchOfPick.some((b) => b === 2)).map((s) => s.id);
  if (withSecond.length > 0) {
    out.push({
      code: 'second-refractor-not-mapped',
      message:
        `Arrivals of ${withSecond.join(', ')} were assigned to a second refractor. This section maps the first refractor only, ` +
        `so those arrivals give no plus times. If the line has two layers only, set the layer count to 2.`,
    });
  }
  return out;
}
