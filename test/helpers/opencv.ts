/**
 * Loads OpenCV (npm @techstark/opencv-js, the official OpenCV.js WASM build) once per test
 * file, as the outside reference for our kernels.
 */
import { createRequire } from 'node:module';

// The module object is a thenable whose then() resolves to itself, so it must not be awaited.
export type Cv = any; // eslint-disable-line @typescript-eslint/no-explicit-any

let loading: Promise<Cv> | undefined;

export function loadOpenCv(): Promise<Cv> {
  if (!loading) {
    loading = new Promise((resolve) => {
      const require = createRequire(import.meta.url);
      const cv = require('@techstark/opencv-js');
      if (cv.Mat) resolve({ cv });
      else cv.onRuntimeInitialized = () => resolve({ cv });
    }).then((box) => {
      const cv = (box as { cv: Cv }).cv;
      // Drop the self-resolving then() so the module can be passed through promises.
      delete cv.then;
      return cv;
    });
  }
  return loading;
}

/** Copies a Mat's bytes out of the WASM heap and frees nothing (caller deletes). */
export function matBytes(mat: Cv): Uint8Array {
  return Uint8Array.from(mat.data);
}

/** Fast exact comparison of two byte arrays (vitest's deep equality is slow on megabytes). */
export function mismatches(a: ArrayLike<number>, b: ArrayLike<number>): string {
  if (a.length !== b.length) return `length ${a.length} vs ${b.length}`;
  let n = 0;
  let first = -1;
  for (let i = 0; i < a.length; i++) {
    if (a[i] !== b[i]) {
      if (first < 0) first = i;
      n++;
    }
  }
  return n === 0 ? 'identical' : `${n} differ, first at ${first}: ${a[first]} vs ${b[first]}`;
}
