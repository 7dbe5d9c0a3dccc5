/**
 * Plain-JSON form of a fitted ICA (arrays of numbers; JSON keeps doubles exactly), so a decoder
 * artifact can store it and a frozen decoder can rebuild it. fromArtifact checks every field.
 */
import { ParamError, ShapeError } from '../types';
import type { FittedIca, IcaMethod } from './ica';

/** JSON-safe ICA parameters; version 1. */
export interface IcaArtifact {
  kind: 'ica';
  version: 1;
  method: IcaMethod;
  mean: number[]; // [chan]
  unmixing: number[][]; // [comp][chan]
  mixing: number[][]; // [chan][comp]
  explainedVariance: number[]; // [comp]
  kurtosisSigns: number[]; // [comp], ±1
  iterations: number;
  converged: boolean;
}

/** Converts a fitted ICA to plain arrays (a copy). */
export function toArtifact(f: FittedIca): IcaArtifact {
  return {
    kind: 'ica',
    version: 1,
    method: f.method,
    mean: Array.from(f.mean),
    unmixing: f.unmixing.map((r) => Array.from(r)),
    mixing: f.mixing.map((r) => Array.from(r)),
    explainedVariance: Array.from(f.explainedVariance),
    kurtosisSigns: Array.from(f.kurtosisSigns),
    iterations: f.iterations,
    converged: f.converged,
  };
}

/**
 * Rebuilds a fitted ICA from {@link toArtifact}'s output (for example after JSON.parse).
 * @throws ParamError for a wrong kind, version, method or value; ShapeError for inconsistent sizes
 */
export function fromArtifact(a: unknown): FittedIca {
  if (typeof a !== 'object' || a === null) throw new ParamError('artifact', 'expected an object');
  const o = a as Record<string, unknown>;
  if (o.kind !== 'ica') throw new ParamError('artifact.kind', `expected 'ica', got ${String(o.kind)}`);
  if (o.version !== 1) throw new ParamError('artifact.version', `expected 1, got ${String(o.version)}`);
  if (o.method !== 'extended-infomax' && o.method !== 'fastica') {
    throw new ParamError('artifact.method', `expected 'extended-infomax' or 'fastica', got ${String(o.method)}`);
  }
  const mean = numbers(o.mean, 'artifact.mean');
  const c = mean.length;
  const unmixing = rows(o.unmixing, 'artifact.unmixing', c);
  const m = unmixing.length;
  const mixing = rows(o.mixing, 'artifact.mixing', m);
  if (mixing.length !== c) throw new ShapeError('artifact.mixing', `expected ${c} rows (channels), got ${mixing.length}`);
  const explainedVariance = numbers(o.explainedVariance, 'artifact.explainedVariance');
  if (explainedVariance.length !== m) throw new ShapeError('artifact.explainedVariance', `expected ${m} values, got ${explainedVariance.length}`);
  const signs = numbers(o.kurtosisSigns, 'artifact.kurtosisSigns');
  if (signs.length !== m || signs.some((s) => s !== 1 && s !== -1)) {
    throw new ParamError('artifact.kurtosisSigns', `expected ${m} values of ±1`);
  }
  if (!Number.isInteger(o.iterations) || (o.iterations as number) < 0) throw new ParamError('artifact.iterations', 'expected a non-negative integer');
  if (typeof o.converged !== 'boolean') throw new ParamError('artifact.converged', 'expected a boolean');
  return {
    method: o.method,
    mean,
    unmixing,
    mixing,
    explainedVariance,
    kurtosisSigns: Int8Array.from(signs),
    iterations: o.iterations as number,
    converged: o.converged,
  };
}

function numbers(v: unknown, field: string): Float64Array {
  if (!Array.isArray(v)) throw new ParamError(field, 'expected an array of numbers');
  return Float64Array.from(v, (x: unknown, i) => {
    if (typeof x !== 'number' || !Number.isFinite(x)) throw new ParamError(field, `entry ${i} is not a finite number`);
    return x;
  });
}

function rows(v: unknown, field: string, width: number): Float64Array[] {
  if (!Array.isArray(v) || v.length < 1) throw new ParamError(field, 'expected a non-empty array of rows');
  return v.map((r: unknown, i) => {
    const row = numbers(r, `${field}[${i}]`);
    if (row.length !== width) throw new ShapeError(`${field}[${i}]`, `expected ${width} values, got ${row.length}`);
    return row;
  });
}
