/**
 * What went wrong with the cameras (GET /api/health, src/kernels/deployment-health.ts): a line
 * under the toolbar while any deployment has a finding, so nobody sets aside a fogged week's
 * triggers without knowing; and, in an open event, the findings that concern that trigger.
 */
import type { DeploymentHealth, HealthFinding } from '../../../../src/shared/health';

export type Problem = HealthFinding & { deployment: string };

export function problemsOf(health: readonly DeploymentHealth[]): Problem[] {
  return health.flatMap((d) => d.health.map((f) => ({ ...f, deployment: d.id })));
}

const SHOWN = 3;

export function CameraProblems({ problems }: { problems: readonly Problem[] }) {
  if (!problems.length) return null;
  return (
    <div className="camera-problems" data-testid="camera-problems" role="note">
      <strong>Camera problems: check these triggers before trusting their verdicts.</strong>
      <ul>
        {problems.slice(0, SHOWN).map((p) => (
          <li key={`${p.deployment}-${p.code}-${p.from}`}>
            {p.deployment}: {p.message}
          </li>
        ))}
        {problems.length > SHOWN && <li>and {problems.length - SHOWN} more (all in `movesift report`, under each deployment)</li>}
      </ul>
    </div>
  );
}

export function EventProblems({ problems }: { problems: readonly Problem[] }) {
  if (!problems.length) return null;
  return (
    <div className="camera-problems camera-problems-event" data-testid="event-problems" role="note">
      {problems.map((p) => (
        <div key={`${p.code}-${p.from}`}>Camera problem for this trigger: {p.message}</div>
      ))}
    </div>
  );
}
