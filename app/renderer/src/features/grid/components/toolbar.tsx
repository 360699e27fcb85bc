/** The line above the grid: what the filters show, the order, the selection, and the way to the keys. */
import type { ScanJobState } from '../../../../../../src/shared/review-api';
import { DECISION_LABEL, LIGHT_LABEL, VERDICT_LABEL, count } from '../../../shared/format';
import type { ViewFilter } from '../../../shared/view-filter';

interface Props {
  ledgerName: string | null;
  filter: ViewFilter;
  total: number | null;
  selected: number;
  heat: boolean;
  scan: ScanJobState | null;
  onHelp(): void;
}

function Chip({ label, value, keyHint, active }: { label: string; value: string; keyHint: string; active: boolean }) {
  return (
    <span className={`chip${active ? ' chip-active' : ''}`} data-chip={label}>
      <kbd>{keyHint}</kbd> {label}: <b>{value}</b>
    </span>
  );
}

export function Toolbar({ ledgerName, filter, total, selected, heat, scan, onHelp }: Props) {
  const decision = filter.decision === undefined ? 'any' : filter.decision === 'none' ? 'undecided' : DECISION_LABEL[filter.decision];
  return (
    <header className="toolbar">
      <div className="toolbar-title">
        <span className="brand">movesift</span>
        <span className="ledger-name" title={ledgerName ?? ''}>{ledgerName}</span>
        {scan?.status === 'running' && (
          <span className="scan-mini" data-testid="scan-mini">
            scanning {scan.phase} {count(scan.done)}/{count(scan.total)}
          </span>
        )}
      </div>
      <div className="toolbar-chips">
        <Chip label="verdict" value={filter.verdict ? VERDICT_LABEL[filter.verdict] : 'any'} keyHint="1 2 3 0" active={!!filter.verdict} />
        <Chip label="decision" value={decision} keyHint="d" active={filter.decision !== undefined} />
        <Chip label="light" value={filter.light ? LIGHT_LABEL[filter.light] : 'any'} keyHint="n" active={!!filter.light} />
        <Chip label="deployment" value={filter.deployment ?? 'any'} keyHint="p" active={!!filter.deployment} />
        <Chip label="score at least" value={filter.scoreMin === undefined ? 'any' : filter.scoreMin.toFixed(2)} keyHint=", ." active={filter.scoreMin !== undefined} />
        <Chip label="score at most" value={filter.scoreMax === undefined ? 'any' : filter.scoreMax.toFixed(2)} keyHint="- +" active={filter.scoreMax !== undefined} />
        <Chip label="order" value={`${filter.sort} ${filter.desc ? '↓' : '↑'}`} keyHint="o r" active={false} />
        <Chip label="overlay" value={heat ? 'on' : 'off'} keyHint="h" active={heat} />
      </div>
      <div className="toolbar-counts">
        <span data-testid="shown-count">{total === null ? '…' : `${count(total)} shown`}</span>
        {selected > 0 && <span className="selected-count" data-testid="selected-count">{count(selected)} selected</span>}
        <button type="button" className="help-button" onClick={onHelp} tabIndex={-1}>
          <kbd>?</kbd> keys
        </button>
      </div>
    </header>
  );
}
