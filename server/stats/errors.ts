/**
 * The one error type of the statistics engine. The API maps it to HTTP 400 with `{ field, message }`,
 * so every check names the input it rejects.
 */
export class StatsInputError extends Error {
  readonly field: string;

  constructor(field: string, message: string) {
    super(message);
    this.name = 'StatsInputError';
    this.field = field;
  }
}

export function requireCount(field: string, value: unknown, min = 0): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min) {
    const what = min === 0 ? 'a whole number, 0 or more' : `a whole number, at least ${min}`;
    throw new StatsInputError(field, `${field} must be ${what} (got ${String(value)}).`);
  }
  return value;
}

/** A probability strictly inside (0, 1): rates, α, β, confidence levels, thresholds. */
export function requireOpenUnit(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0 || value >= 1) {
    throw new StatsInputError(field, `${field} must be a number strictly between 0 and 1 (got ${String(value)}).`);
  }
  return value;
}

export function requirePositive(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new StatsInputError(field, `${field} must be a positive number (got ${String(value)}).`);
  }
  return value;
}

export function requireAtMost(field: string, value: number, limitName: string, limit: number): void {
  if (value > limit) {
    throw new StatsInputError(field, `${field} (${value}) cannot exceed ${limitName} (${limit}).`);
  }
}
