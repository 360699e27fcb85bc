/**
 * The virtualised grid: only the rows in view (and two either side) exist in the page, whatever
 * the number of events, and the pages behind them are fetched as they come near. Card width
 * follows the window; the row height follows the card width.
 */
import { useEffect, useLayoutEffect, useRef, useState } from 'react';
import type { EventPages } from '../hooks/use-event-pages';
import { EventCardView } from './event-card';

export const CARD_MIN_WIDTH = 210;
const GAP = 10;
const FACTS_HEIGHT = 74;
const OVERSCAN_ROWS = 2;

export interface GridGeometry {
  cols: number;
  rowsInView: number;
}

interface Props {
  pages: EventPages;
  focus: number;
  selected: ReadonlySet<string>;
  heat: boolean;
  onPick(index: number, extend: boolean): void;
  onOpen(index: number): void;
  onGeometry(g: GridGeometry): void;
}

export function EventGrid({ pages, focus, selected, heat, onPick, onOpen, onGeometry }: Props) {
  const scroller = useRef<HTMLDivElement>(null);
  const [size, setSize] = useState({ width: 0, height: 0 });
  // The row at the top of the view, not the scroll offset: React renders only when a row boundary
  // is crossed, and the browser scrolls the already laid-out rows in between.
  const [topRow, setTopRow] = useState(0);

  useLayoutEffect(() => {
    const el = scroller.current!;
    const ro = new ResizeObserver(() => setSize({ width: el.clientWidth, height: el.clientHeight }));
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  const total = pages.total ?? 0;
  const cols = Math.max(1, Math.floor((size.width - GAP) / (CARD_MIN_WIDTH + GAP)));
  const cardW = Math.floor((size.width - GAP * (cols + 1)) / cols);
  const cardH = Math.round(cardW * 0.5625) + FACTS_HEIGHT;
  const rowH = cardH + GAP;
  const rows = Math.ceil(total / cols);
  const rowsInView = Math.max(1, Math.floor(size.height / rowH));
  const first = Math.max(0, topRow - OVERSCAN_ROWS);
  const last = Math.min(rows, topRow + Math.ceil(size.height / rowH) + 1 + OVERSCAN_ROWS);

  useEffect(() => {
    onGeometry({ cols, rowsInView });
  }, [cols, rowsInView, onGeometry]);
  useEffect(() => {
    pages.ensure(first * cols, last * cols + cols * 4);
  }, [first, last, cols, pages]);

  // Keep the focused card in view as the keyboard moves it.
  useEffect(() => {
    const el = scroller.current;
    if (!el || total === 0) return;
    const top = Math.floor(focus / cols) * rowH;
    if (top < el.scrollTop) el.scrollTop = top;
    else if (top + rowH > el.scrollTop + el.clientHeight) el.scrollTop = top + rowH - el.clientHeight + GAP;
  }, [focus, cols, rowH, total]);

  const hasCards = pages.total !== null && pages.get(first * cols) !== undefined;
  useEffect(() => {
    // A user-timing mark for the review benchmark (time to the first real cards).
    if (hasCards && performance.getEntriesByName('movesift:first-cards').length === 0) performance.mark('movesift:first-cards');
  }, [hasCards]);

  const rowEls = [];
  for (let r = first; r < last; r++) {
    const cards = [];
    for (let c = 0; c < cols; c++) {
      const i = r * cols + c;
      if (i >= total) break;
      const card = pages.get(i);
      cards.push(
        <EventCardView key={c} card={card} index={i} focused={i === focus} selected={!!card && selected.has(card.id)} heat={heat} width={cardW} height={cardH} left={GAP + c * (cardW + GAP)} onPick={onPick} onOpen={onOpen} />,
      );
    }
    rowEls.push(
      <div className="grid-row" key={r} style={{ transform: `translateY(${r * rowH + GAP}px)`, height: cardH }} role="row">
        {cards}
      </div>,
    );
  }
  return (
    <div className="grid-scroll" ref={scroller} onScroll={(e) => setTopRow(Math.floor(e.currentTarget.scrollTop / rowH))} role="grid" aria-rowcount={rows} data-total={total} data-version={pages.version}>
      <div className="grid-space" style={{ height: rows * rowH + GAP }}>
        {rowEls}
      </div>
    </div>
  );
}
