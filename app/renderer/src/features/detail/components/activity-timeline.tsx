/** A clip's activity score over time, its activity windows as bands, and where playback is. Click to seek. */
import type { ActivityWindow } from '../../../../../../src/shared/review-api';

interface Props {
  times: number[];
  scores: number[];
  windows: ActivityWindow[];
  duration: number;
  current: number;
  onSeek(t: number): void;
}

const W = 1000;
const H = 60;

export function ActivityTimeline({ times, scores, windows, duration, current, onSeek }: Props) {
  const x = (t: number) => (duration > 0 ? (t / duration) * W : 0);
  const y = (s: number) => H - 4 - s * (H - 8);
  const line = times.map((t, i) => `${x(t).toFixed(1)},${y(scores[i]).toFixed(1)}`).join(' ');
  return (
    <svg
      className="timeline"
      viewBox={`0 0 ${W} ${H}`}
      preserveAspectRatio="none"
      data-testid="timeline"
      onClick={(e) => {
        const r = e.currentTarget.getBoundingClientRect();
        onSeek(((e.clientX - r.left) / r.width) * duration);
      }}
    >
      {windows.map((w, i) => (
        <rect key={i} x={x(w.start_s)} y={0} width={Math.max(2, x(w.end_s) - x(w.start_s))} height={H} className="timeline-window" />
      ))}
      <polyline points={line} className="timeline-score" vectorEffect="non-scaling-stroke" />
      <line x1={x(current)} x2={x(current)} y1={0} y2={H} className="timeline-now" vectorEffect="non-scaling-stroke" />
    </svg>
  );
}
