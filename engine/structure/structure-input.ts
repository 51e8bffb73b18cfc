/**
 * Input checks shared by the structure detectors. Every failure names the offending field
 * and value, so a caller (interpret.ts, a test, a person reading a 400 response) sees at
 * once what was wrong; nothing here ever returns NaN silently.
 */

/** Thrown for bad input to a structure detector; `field` names the argument at fault. */
export class StructureInputError extends Error {
  readonly code = 'structure-input';
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(`${field}: ${message}`);
    this.name = 'StructureInputError';
  }
}

/** Checks that xM is finite and strictly increasing. */
export function checkPositions(xM: readonly number[], field = 'xM'): void {
  if (!Array.isArray(xM)) throw new StructureInputError(field, 'must be an array of positions in metres');
  for (let i = 0; i < xM.length; i++) {
    if (typeof xM[i] !== 'number' || !Number.isFinite(xM[i])) {
      throw new StructureInputError(`${field}[${i}]`, `must be a finite number of metres, got ${String(xM[i])}`);
    }
    if (i > 0 && !(xM[i] > xM[i - 1])) {
      throw new StructureInputError(`${field}[${i}]`, `positions must increase strictly, got ${xM[i]} after ${xM[i - 1]}`);
    }
  }
}

/** Checks that values has the same length as xM and holds finite numbers or null. */
export function checkValues(values: readonly (number | null)[], length: number, field: string): void {
  if (!Array.isArray(values)) throw new StructureInputError(field, 'must be an array');
  if (values.length !== length) {
    throw new StructureInputError(field, `has ${values.length} entries but there are ${length} positions`);
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== null && (typeof v !== 'number' || !Number.isFinite(v))) {
      throw new StructureInputError(`${field}[${i}]`, `must be a finite number or null, got ${String(v)}`);
    }
  }
}

/** Checks a strictly positive finite scalar. */
export function checkPositive(value: number, field: string): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new StructureInputError(field, `must be a positive finite number, got ${String(value)}`);
  }
}

/** Pairs of (x, value) where value is not null, in order. */
export function presentPoints(xM: readonly number[], values: readonly (number | null)[]): { x: number[]; y: number[]; index: number[] } {
  const x: number[] = [];
  const y: number[] = [];
  const index: number[] = [];
  for (let i = 0; i < xM.length; i++) {
    const v = values[i];
    if (v !== null && v !== undefined) {
      x.push(xM[i]);
      y.push(v);
      index.push(i);
    }
  }
  return { x, y, index };
}
