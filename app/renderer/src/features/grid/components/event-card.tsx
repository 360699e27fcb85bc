/** One event in the grid: its picture, what the screener said, and what a person decided. */
import { memo } from 'react';
import type { EventCard as Card } from '../../../../../../src/shared/review-api';
import { api } from '../../../shared/api';
import { DECISION_LABEL, LIGHT_LABEL, VERDICT_LABEL, shortTime } from '../../../shared/format';

interface Props {
  card: Card | undefined;
  index: number;
  focused: boolean;
  selected: boolean;
  heat: boolean;
  width: number;
  height: number;
  left: number;
  onPick(index: number, extend: boolean): void;
  onOpen(index: number): void;
}

export const EventCardView = memo(function EventCardView({ card, index, focused, selected, heat, width, height, left, onPick, onOpen }: Props) {
  const cls = ['card', focused && 'is-focused', selected && 'is-selected', card?.decision && `decided-${card.decision}`].filter(Boolean).join(' ');
  const style = { width, height, transform: `translateX(${left}px)` };
  if (!card) return <div className={`${cls} is-loading`} style={style} aria-busy="true" />;
  const picture = heat && card.heat !== null ? api.previewUrl(card.id, 'heat', card.heat) : card.thumb !== null ? api.previewUrl(card.id, 'frame', card.thumb) : null;
  return (
    <div
      className={cls}
      style={style}
      data-event={card.id}
      data-verdict={card.verdict}
      data-decision={card.decision ?? 'none'}
      onClick={(e) => onPick(index, e.shiftKey)}
      onDoubleClick={() => onOpen(index)}
      role="gridcell"
      aria-selected={selected}
    >
      <div className="card-picture">
        {picture ? <img src={picture} alt="" decoding="async" draggable={false} /> : <div className="card-nopicture">no preview</div>}
        <span className="card-kind">{card.kind === 'clip' ? 'clip' : `${card.frames} frame${card.frames === 1 ? '' : 's'}`}</span>
        {selected && <span className="card-tick" aria-label="selected">✓</span>}
        {card.decision && <span className={`card-decision decision-${card.decision}`}>{DECISION_LABEL[card.decision]}</span>}
      </div>
      <div className="card-facts">
        <div className="card-meter" title={`motion evidence ${card.score.toFixed(3)}`}>
          <span className={`meter-fill verdict-${card.verdict}`} style={{ width: `${Math.max(2, card.score * 100)}%` }} />
        </div>
        <div className="card-line">
          <span className={`verdict-word verdict-${card.verdict}`}>{VERDICT_LABEL[card.verdict]}</span>
          <span className="card-score">{card.score.toFixed(2)}</span>
        </div>
        <div className="card-line card-dim">
          <span>{shortTime(card.start)}</span>
          <span>{card.light ? LIGHT_LABEL[card.light] : ''}</span>
        </div>
        <div className="card-line card-dim card-deployment" title={card.deployment}>{card.deployment}</div>
      </div>
    </div>
  );
});
