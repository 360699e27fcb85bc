/** Progress events of a scan, as printed by `--json-progress` (one JSON object per line). */
import type { ScanSummary } from './scan.js';

export type ScanProgress =
  | { type: 'phase'; phase: 'discover' | 'read' | 'analyse'; total?: number; skipped?: number }
  | { type: 'progress'; phase: 'read' | 'analyse'; done: number; total: number; file?: string; rate?: number; etaS?: number }
  | { type: 'error'; file: string; code: string; message: string }
  | { type: 'done'; summary: ScanSummary };
