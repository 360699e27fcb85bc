/** Progress events of a scan, as printed by `--json-progress` (one JSON object per line), and
 *  the summary its last one carries. */
import type { DataStrip } from '../kernels/data-strip.js';
import type { LockHolder } from '../ledger/ledger-lock.js';
import type { SkipReasonName } from '../media/find-media.js';

export interface ScanSummary {
  scanId: number;
  stopped: boolean;
  files: number;
  events: number;
  analysed: number;
  skipped: number;
  errors: number;
  verdicts: Record<string, number>;
  seconds: number;
  /** A lock left by a scan, apply or undo that died, taken over (ledger-lock.ts). */
  tookOverLock?: LockHolder;
  /** Entries under the scanned folders that are neither media nor errors, by reason
   *  (find-media.ts); the report lists each. */
  passedOver: Partial<Record<SkipReasonName, number>>;
}


export type ScanProgress =
  | { type: 'phase'; phase: 'discover' | 'read' | 'analyse'; total?: number; skipped?: number }
  | { type: 'progress'; phase: 'read' | 'analyse'; done: number; total: number; file?: string; rate?: number; etaS?: number }
  | { type: 'error'; file: string; code: string; message: string }
  /** What the scan learned of a deployment before screening its events: its data strip by
   *  consensus over `frames` triggers (none when too few; `note` then says so). */
  | { type: 'deployment'; deployment: string; frames: number; strip?: DataStrip; note?: string }
  /** Pass two's calibration of a deployment and light mode (deployment-pass.ts); `note` when it
   *  was not applied, saying why. */
  | { type: 'calibration'; deployment: string; light: string; status: string; usable: number; cut: number; note?: string }
  | { type: 'done'; summary: ScanSummary };
