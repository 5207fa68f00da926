/** Invalid input to the engine. `field` names the offending input path, e.g. 'room.floorAreaM2'. */
export class EngineInputError extends Error {
  readonly code = 'ENGINE_INPUT' as const;
  readonly field: string;

  constructor(field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'EngineInputError';
    this.field = field;
  }
}

/** Throws EngineInputError unless `value` is a finite number in [min, max]. */
export function requireRange(field: string, value: number, min: number, max: number, unit = ''): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new EngineInputError(field, `must be a number, got ${String(value)}`);
  }
  if (value < min || value > max) {
    const u = unit ? ` ${unit}` : '';
    throw new EngineInputError(field, `must be between ${min} and ${max}${u}, got ${value}${u}`);
  }
  return value;
}

/** Throws EngineInputError unless `value` is one of `allowed`. */
export function requireOneOf<T extends string>(field: string, value: T, allowed: readonly T[]): T {
  if (!allowed.includes(value)) {
    throw new EngineInputError(field, `must be one of ${allowed.join(', ')}, got ${String(value)}`);
  }
  return value;
}
