/** Deployment health findings (src/kernels/deployment-health.ts): the report's
 *  `deployments[].health`, `GET /api/health` and the review app share this shape. */
export type HealthCode = 'clock-implausible' | 'clock-backwards' | 'view-changed' | 'lens-obscured' | 'night-dark';

export interface HealthFinding {
  code: HealthCode;
  /** First and last trigger concerned (event ids), and how many. */
  from: string;
  to: string;
  events: number;
  /** Every trigger concerned. */
  eventIds: string[];
  message: string;
}

export interface DeploymentHealth {
  id: string;
  /** Empty when nothing was found. */
  health: HealthFinding[];
}
