/**
 * The shapes the review API sends and takes: the contract between the request handler and the
 * renderer (which imports these types and nothing else from the backend).
 */
export type Verdict = 'likely-blank' | 'unsure' | 'motion';
export type Decision = 'keep' | 'set-aside';
export type Light = 'colour' | 'infrared';

export interface EventFilter {
  verdict?: Verdict;
  deployment?: string;
  scoreMin?: number;
  scoreMax?: number;
  /** 'none' = no decision yet. */
  decision?: Decision | 'none';
  light?: Light;
  sort: 'time' | 'score';
  desc: boolean;
  offset: number;
  limit: number;
}

export interface EventCard {
  id: string;
  kind: 'burst' | 'single' | 'clip';
  deployment: string;
  start: string;
  end: string;
  frames: number;
  score: number;
  verdict: Verdict;
  decision: Decision | null;
  light: Light | null;
  /** Position of the first frame preview, or null when the event has none. */
  thumb: number | null;
  /** Position of the change-overlay preview, or null. */
  heat: number | null;
}

export interface EventPage {
  total?: number;
  events: EventCard[];
}

export interface BlobBox {
  x: number;
  y: number;
  w: number;
  h: number;
  area: number;
  peak: number;
}

export interface EventMedia {
  id: number;
  position: number;
  rel_path: string;
  kind: 'image' | 'video';
  capture_time: string;
  width: number;
  height: number;
  duration_s: number | null;
}

export interface PreviewInfo {
  kind: 'frame' | 'heat';
  position: number;
  width: number;
  height: number;
  time_s: number | null;
}

export interface ActivityWindow {
  start_s: number;
  end_s: number;
  score: number;
}

/** `detail` of a burst or single image (pipeline/analyse-task.ts). */
export interface ImageDetail {
  strip: { top: number; bottom: number };
  /** Where the ignored rows came from: this event's frames, or the deployment's triggers by
   *  consensus (older ledgers: absent). */
  stripFrom?: 'event' | 'deployment' | null;
  /** Neighbouring triggers offered as the deployment background. */
  background: number;
  /** Whether a deployment background was built from them (absent in ledgers scanned before it
   *  was recorded), and how each neighbour fitted. */
  deployment?: boolean;
  neighbours?: Array<{ kept: boolean; disagreement: number; shift: { dx: number; dy: number } }>;
  /** Light moved unevenly over the scene (a cloud shadow, moving shade): likely-blank only at a
   *  very low score (EventContext.movingLight). Absent in ledgers scanned before it was recorded. */
  movingLight?: boolean;
  frames: Array<{ position: number; shift: { dx: number; dy: number; confidence: number }; compensated: boolean; blobs: BlobBox[] }>;
  bestTrack: Array<BlobBox & { position: number }>;
}

/** `detail` of a clip: the activity score of every analysed frame. */
export interface ClipDetail {
  times: number[];
  scores: number[];
}

/** Which rule decided a verdict: the fitted model's, the deployment's own calibration, or the
 *  change classifier's second opinion (classifier/combine.ts), or the deployment's model learned
 *  from people's decisions (classifier/learned-model.ts). */
export type VerdictRule = 'model' | 'deployment' | 'classifier' | 'learned';

/** What an event's features keep of the change classifier's opinion (pipeline/analyse-task.ts). */
export interface ClassifierOpinion {
  model: string;
  score: number;
  rule: { classifierBlank: number; motionCeiling: number };
  motionVerdict: string;
  drivenBy: 'motion' | 'classifier';
}

/** Pass two's calibration of the event's deployment and light mode (kernels/deployment-calibration.ts). */
export interface EventCalibration {
  status: 'applied' | 'too-few' | 'busy' | 'labels' | 'off';
  /** The blank threshold in force for the deployment, and the fitted model's. */
  cut: number;
  fittedBlank: number;
  /** Events the statistics used. */
  usable: number;
  light: string;
}

export interface EventDetail extends Omit<EventCard, 'thumb' | 'heat'> {
  rule: VerdictRule;
  /** Null for clips, and for events of a ledger whose second pass has not run. */
  calibration: EventCalibration | null;
  engine_version: string;
  analysis_width: number;
  analysis_height: number;
  detail: ImageDetail | ClipDetail;
  features: unknown;
  media: EventMedia[];
  windows: ActivityWindow[];
  previews: PreviewInfo[];
}

export interface DeploymentCount {
  deployment: string;
  verdict: Verdict;
  decision: Decision | null;
  n: number;
}

export interface DecideResult {
  batch: string;
  written: number;
  changed: number;
  missing: string[];
}

export interface UndoResult {
  batch: string | null;
  restored: number;
  /** Each event the undo touched and the decision it has again (null: none). */
  events: Array<{ id: string; decision: Decision | null }>;
  /** The batch asked for is no longer the latest: nothing was undone. */
  stale?: boolean;
}

/** The decisions an undo would take back now. */
export interface LastBatch {
  batch: string;
  /** `single` or `bulk` from the app, `command` from `movesift decide`. */
  source: string;
  who: string | null;
  at: string;
  decision: Decision;
  events: number;
}

export interface ScanJobState {
  job: number;
  ledger: string;
  folders: string[];
  status: 'running' | 'done' | 'stopped' | 'failed';
  phase: 'discover' | 'read' | 'analyse' | null;
  done: number;
  total: number;
  skipped: number;
  rate: number | null;
  etaS: number | null;
  file: string | null;
  errorCount: number;
  /** The latest file errors, newest last (the ledger holds all of them). */
  errors: Array<{ file: string; code: string; message: string }>;
  summary: { files: number; events: number; analysed: number; skipped: number; errors: number; verdicts: Record<string, number>; seconds: number; stopped: boolean } | null;
  failure: { code: string; message: string } | null;
}

export interface TaskState {
  task: number;
  kind: 'apply' | 'undo' | 'cut';
  status: 'running' | 'done' | 'failed';
  done: number;
  total: number;
  file: string | null;
  result: unknown;
  failure: { code: string; message: string } | null;
}

export interface SessionInfo {
  ledger: string | null;
  name: string | null;
  engineVersion: string;
  user: string;
  scan: ScanJobState | null;
  task: TaskState | null;
}

export interface ApplyPlan {
  files: number;
  bytes: number;
  events: number;
  moves: Array<{ source: string; dest: string }>;
}

export interface ApplyInfo {
  id: number;
  started_at: string;
  finished_at: string | null;
  target: string;
  mode: 'move' | 'copy';
  status: string;
  who: string | null;
  moved: number;
  bytes: number;
}

export interface AuditItem {
  position: number;
  event_id: string;
  stratum: number;
  score: number | null;
  verdict: string | null;
  animal: number | null;
  who: string | null;
  at: string | null;
}

export interface AuditReport {
  id: number;
  createdAt: string;
  who: string | null;
  seed: number;
  population: number;
  sampleSize: number;
  answered: number;
  animals: number;
  tolerance: number;
  alpha: number;
  share: { estimate: number; lower: number; upper: number; method: 'clopper-pearson' | 'hypergeometric' };
  shareUpperOneSided: number;
  missedEvents: { estimate: number; lower: number; upper: number };
  verdict: 'pass' | 'fail' | 'incomplete';
  zeroMissSampleSize: number;
  /** Score bands of the draw, with what was found in each (one band for a simple random sample). */
  strata: Array<{ band: number; scoreFrom: number; scoreTo: number; population: number; sample: number; answered: number; animals: number }>;
  items: AuditItem[];
}

export interface CalibrationResult {
  target: number;
  animals: number;
  empties: number;
  threshold: number;
  recall: number;
  recallLower: number;
  wouldBeBlank: number;
  blankNow: number;
  undecidedChanges: number;
  applied: boolean;
}

export interface ApiError {
  code: string;
  message: string;
}
