/**
 * A survey clip: the original video (seekable through range requests), the activity timeline
 * under it, and the list of activity windows; keys jump between windows and step through time.
 * The video has no built-in controls, so every key reaches our own handler.
 */
import { useEffect, useRef, useState } from 'react';
import type { ClipDetail, EventDetail } from '../../../../../../src/shared/review-api';
import type { Action } from '../../../shared/keys';
import { api } from '../../../shared/api';
import { seconds } from '../../../shared/format';
import { ActivityTimeline } from './activity-timeline';

const STEP_S = 2;

interface Props {
  event: EventDetail;
  bindActions(fn: ((a: Action) => boolean) | null): void;
}

export function ClipView({ event, bindActions }: Props) {
  const video = useRef<HTMLVideoElement>(null);
  const [now, setNow] = useState(0);
  const [playing, setPlaying] = useState(false);
  const detail = event.detail as ClipDetail;
  const m = event.media[0];
  const duration = m.duration_s ?? detail.times[detail.times.length - 1] ?? 0;
  const windows = event.windows;
  const inWindow = windows.findIndex((w) => now >= w.start_s && now <= w.end_s);

  useEffect(() => {
    const seek = (t: number) => {
      const v = video.current!;
      v.currentTime = Math.max(0, Math.min(duration, t));
      setNow(v.currentTime);
    };
    bindActions((a) => {
      const v = video.current;
      if (!v) return false;
      const t = v.currentTime;
      if (a === 'frame-prev') return seek(t - STEP_S), true;
      if (a === 'frame-next') return seek(t + STEP_S), true;
      if (a === 'window-next') {
        const w = windows.find((w) => w.start_s > t + 0.05);
        if (w) seek(w.start_s);
        return true;
      }
      if (a === 'window-prev') {
        const w = [...windows].reverse().find((w) => w.start_s < t - 0.5);
        seek(w ? w.start_s : 0);
        return true;
      }
      if (a === 'play-pause') {
        if (v.paused) void v.play().catch(() => {});
        else v.pause();
        return true;
      }
      return false;
    });
    return () => bindActions(null);
  }, [bindActions, windows, duration]);

  return (
    <div className="clip">
      <div className="stage">
        <video
          ref={video}
          src={api.mediaUrl(m.id)}
          preload="auto"
          tabIndex={-1}
          muted
          playsInline
          data-testid="clip-video"
          onTimeUpdate={(e) => setNow(e.currentTarget.currentTime)}
          onSeeked={(e) => setNow(e.currentTarget.currentTime)}
          onPlay={() => setPlaying(true)}
          onPause={() => setPlaying(false)}
        />
      </div>
      <ActivityTimeline times={detail.times} scores={detail.scores} windows={windows} duration={duration} current={now} onSeek={(t) => video.current && (video.current.currentTime = t)} />
      <div className="detail-facts">
        <span data-testid="clip-time">
          {seconds(now)} / {seconds(duration)}
        </span>
        <span>{playing ? 'playing' : 'paused'}</span>
        <span data-testid="clip-window">{inWindow >= 0 ? `in window ${inWindow + 1} of ${windows.length}` : `${windows.length} activity window${windows.length === 1 ? '' : 's'}`}</span>
        <span className="mono">{m.rel_path}</span>
      </div>
      <ol className="window-list">
        {windows.map((w, i) => (
          <li key={i} className={i === inWindow ? 'window-current' : ''}>
            <button type="button" tabIndex={-1} onClick={() => video.current && (video.current.currentTime = w.start_s)}>
              {seconds(w.start_s)}–{seconds(w.end_s)} <span className="card-dim">score {w.score.toFixed(2)}</span>
            </button>
          </li>
        ))}
      </ol>
    </div>
  );
}
