/**
 * Structure detectors, grouped for the interpretation pipeline: lateral refractor-velocity
 * changes, step faults, planar dip, layer stripping, hidden layers and velocity inversions.
 * Plain arrays in (x in m, times in ms, velocities in m/s), plain objects out.
 */
export { findRefractorVelocityChanges } from './velocity-changes.js';
export type { VelocityChangeOptions, VelocityChangeResult, VelocitySegment, RefractorVelocityChange } from './velocity-changes.js';
export { findDelayTimeSteps, findBranchSteps, correctStepPosition, combineStepEvidence, throwFromDelayJump } from './steps.js';
export type { DelayTimeStep, BranchStep, StepDetectorOptions, BranchStepOptions, CombineStepOptions } from './steps.js';
export { planarDip, localDips } from './planar-dip.js';
export type { PlanarDipFit, LocalDip } from './planar-dip.js';
export { stripLayers, thicknessesFromInterceptTimes } from '../depth/layer-stripping.js';
export type { StrippedLayers } from '../depth/layer-stripping.js';
export { maxHiddenLayerThickness, isLayerHidden, hiddenLayerWarning, velocityInversion } from './hidden-layer.js';
export type { HiddenLayerInput, HiddenLayerBound, HiddenLayerWarningInput } from './hidden-layer.js';
export { robustNoiseSigma } from './noise-level.js';
export { StructureInputError } from './structure-input.js';
