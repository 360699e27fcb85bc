/**
 * Restless-pixel map of a deployment: how often each pixel was active across its events, and
 * a weight that discounts places that move in nearly every trigger (a branch, a grass tuft, the
 * waterline). A subject crossing such a place still registers where it leaves it.
 *
 * weight = 1 for frequency <= `calm`; falls linearly to `floor` at frequency 1. The floor is
 * above zero so that a large animal standing in front of a branch can never vanish entirely
 * (a missed animal costs more than a blank kept).
 */
import { checkInteger, checkNumber } from '../shared/validate.js';
import { sizeMismatch } from '../shared/errors.js';

export interface RestlessMap {
  width: number;
  height: number;
  events: number;
  counts: Uint16Array;
}

export function makeRestlessMap(width: number, height: number): RestlessMap {
  checkInteger('width', width, 1, 1 << 15);
  checkInteger('height', height, 1, 1 << 15);
  return { width, height, events: 0, counts: new Uint16Array(width * height) };
}

/** Adds one event's activity (nonzero = active at any frame of the event). */
export function addActivity(map: RestlessMap, active: Uint8Array): void {
  if (active.length !== map.counts.length) throw sizeMismatch('active.length', String(map.counts.length), String(active.length));
  if (map.events >= 65535) return;
  map.events++;
  for (let i = 0; i < active.length; i++) if (active[i]) map.counts[i]++;
}

export function restlessWeights(map: RestlessMap, calm = 0.25, floor = 0.35, minEvents = 5): Float32Array | undefined {
  checkNumber('calm', calm, 0, 0.99);
  checkNumber('floor', floor, 0, 1);
  if (map.events < minEvents) return undefined; // too few events to call any place restless
  const w = new Float32Array(map.counts.length);
  for (let i = 0; i < w.length; i++) {
    const f = map.counts[i] / map.events;
    w[i] = f <= calm ? 1 : 1 - ((1 - floor) * (f - calm)) / (1 - calm);
  }
  return w;
}
