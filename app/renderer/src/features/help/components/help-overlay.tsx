/** Every key, straight from the one key table, grouped by where it works. */
import { KEYS, keyLabel, type Mode } from '../../../shared/keys';

const PLACES: Array<{ mode: Mode; title: string }> = [
  { mode: 'grid', title: 'Grid' },
  { mode: 'detail', title: 'One event (burst or clip)' },
  { mode: 'audit', title: 'Audit' },
  { mode: 'confirm', title: 'When asked to confirm' },
];

export function HelpOverlay({ onClose }: { onClose(): void }) {
  return (
    <div className="overlay" role="dialog" aria-modal="true" aria-labelledby="help-title" onClick={onClose}>
      <div className="dialog dialog-help" onClick={(e) => e.stopPropagation()}>
        <h2 id="help-title">Keys</h2>
        <div className="help-columns">
          {PLACES.map((p) => (
            <section key={p.mode}>
              <h3>{p.title}</h3>
              {KEYS.filter((k) => k.modes.includes(p.mode)).map((k) => (
                <div className="help-row" key={k.action + k.keys.join()}>
                  <span className="help-keys">
                    {k.keys.map((key) => (
                      <kbd key={key}>{keyLabel(key)}</kbd>
                    ))}
                  </span>
                  <span>{k.text}</span>
                </div>
              ))}
            </section>
          ))}
        </div>
        <p className="help-foot">Decisions are recorded in the ledger with your name and the screener's score; nothing is moved or deleted from here. <kbd>Esc</kbd> closes this list.</p>
      </div>
    </div>
  );
}
