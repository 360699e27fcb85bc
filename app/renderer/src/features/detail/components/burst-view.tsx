/**
 * A burst (or single image) frame by frame: the original picture, the blobs the engine found in
 * that frame drawn over it (the best track's in the accent colour), and, with the overlay on, the
 * change heat of the frame where the best track was largest.
 */
import { useEffect, useState } from 'react';
import type { EventDetail, ImageDetail } from '../../../../../../src/shared/review-api';
import type { Action } from '../../../shared/keys';
import { api } from '../../../shared/api';
import { shortTime } from '../../../shared/format';

interface Props {
  event: EventDetail;
  heat: boolean;
  bindActions(fn: ((a: Action) => boolean) | null): void;
}

export function BurstView({ event, heat, bindActions }: Props) {
  const detail = event.detail as ImageDetail;
  const [k, setK] = useState(0);
  const media = event.media;
  const n = media.length;
  const m = media[Math.min(k, n - 1)];
  const analysed = detail.frames.find((f) => f.position === m.position);
  const best = detail.bestTrack.filter((b) => b.position === m.position);
  const heatPreview = event.previews.find((p) => p.kind === 'heat');
  const showHeat = heat && heatPreview?.position === m.position;

  useEffect(() => {
    bindActions((a) => {
      if (a === 'frame-prev') return setK((v) => Math.max(0, v - 1)), true;
      if (a === 'frame-next') return setK((v) => Math.min(n - 1, v + 1)), true;
      return false;
    });
    return () => bindActions(null);
  }, [bindActions, n]);

  // Warm the cache for the neighbouring frames, so flipping does not wait for a decode.
  useEffect(() => {
    for (const j of [k - 1, k + 1]) if (j >= 0 && j < n) new Image().src = api.mediaUrl(media[j].id);
  }, [k, n, media]);

  const isBest = (b: { x: number; y: number }) => best.some((t) => t.x === b.x && t.y === b.y);
  return (
    <div className="burst">
      <div className="stage">
        <div className="frame-box" style={{ aspectRatio: `${m.width} / ${m.height}` }} data-testid="burst-frame" data-position={m.position}>
          <img src={showHeat ? api.previewUrl(event.id, 'heat', heatPreview!.position) : api.mediaUrl(m.id)} alt={m.rel_path} draggable={false} />
          {heat && analysed && (
            <svg viewBox={`0 0 ${event.analysis_width} ${event.analysis_height}`} preserveAspectRatio="none" className="blob-layer" data-testid="blob-layer">
              {analysed.blobs.map((b, i) => (
                <rect key={i} x={b.x} y={b.y} width={b.w} height={b.h} className={isBest(b) ? 'blob-best' : 'blob-other'} />
              ))}
              {detail.strip.top > 0 && <rect x={0} y={0} width={event.analysis_width} height={detail.strip.top} className="strip-ignored" />}
              {detail.strip.bottom > 0 && <rect x={0} y={event.analysis_height - detail.strip.bottom} width={event.analysis_width} height={detail.strip.bottom} className="strip-ignored" />}
            </svg>
          )}
        </div>
      </div>
      <div className="frame-strip" role="list">
        {media.map((f, j) => (
          <button type="button" tabIndex={-1} key={f.id} className={j === k ? 'strip-current' : ''} onClick={() => setK(j)} role="listitem">
            <img src={api.previewUrl(event.id, 'frame', f.position)} alt="" draggable={false} />
          </button>
        ))}
      </div>
      <div className="detail-facts">
        <span data-testid="frame-counter">
          frame {k + 1} of {n}
        </span>
        <span>{shortTime(m.capture_time)}</span>
        <span className="mono">{m.rel_path}</span>
        {analysed && <span>{analysed.blobs.length} change blob{analysed.blobs.length === 1 ? '' : 's'}</span>}
        {analysed?.compensated && <span>camera shift corrected ({analysed.shift.dx}, {analysed.shift.dy}) px</span>}
        {detail.strip.top + detail.strip.bottom > 0 && <span>{detail.stripFrom === 'deployment' ? "data strip ignored (found across this deployment's triggers)" : 'data strip ignored'}</span>}
        <span data-testid="background-note">{backgroundNote(event.kind, detail)}</span>
        {detail.movingLight && <span data-testid="light-note">light moving over the scene (cloud or shade): an animal in it can score like the light, so this is called likely-blank only at a very low score</span>}
      </div>
    </div>
  );
}

/** What this event was compared with besides its own frames, said plainly: without a
 *  background from other triggers, an animal that never moved cannot show. */
function backgroundNote(kind: string, d: ImageDetail): string {
  const kept = d.neighbours?.filter((x) => x.kept).length;
  if (d.background === 0) return kind === 'single' ? 'no neighbouring trigger to compare with' : 'no neighbouring trigger: an animal that never moved in this burst cannot show';
  if (d.deployment === undefined) return `compared with ${d.background} neighbouring triggers`;
  if (d.deployment) return `compared with ${kept} of ${d.background} neighbouring triggers`;
  return `neighbouring triggers too unlike this one (${kept ?? 0} of ${d.background} matched): an animal that never moved cannot show`;
}
