/**
 * Validators used once at each public entry. Messages name the parameter, what was expected
 * and what came in: "threshold: wanted integer 0-255, got 300".
 */
import { invalidArgument } from './errors.js';

export function checkNumber(name: string, value: number, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    throw invalidArgument(name, `number ${min}-${max}`, value);
  }
  return value;
}

export function checkInteger(name: string, value: number, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    throw invalidArgument(name, `integer ${min}-${max}`, value);
  }
  return value;
}

export function checkPositive(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw invalidArgument(name, 'finite number > 0', value);
  }
  return value;
}

export function checkOneOf<T extends string>(name: string, value: T, allowed: readonly T[]): T {
  if (!allowed.includes(value)) throw invalidArgument(name, `one of ${allowed.join('|')}`, value);
  return value;
}
