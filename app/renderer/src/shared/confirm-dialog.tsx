/**
 * The question asked before a decision that could cost an animal: many events at once, or
 * events the screener saw motion in. The safe answer is the default: Enter and Esc both say no.
 */
export interface ConfirmRequest {
  title: string;
  lines: string[];
  yesLabel: string;
}

export function ConfirmDialog({ request, onYes, onNo }: { request: ConfirmRequest; onYes(): void; onNo(): void }) {
  return (
    <div className="overlay" role="dialog" aria-modal="true" aria-labelledby="confirm-title">
      <div className="dialog dialog-warn">
        <h2 id="confirm-title">{request.title}</h2>
        {request.lines.map((l, i) => (
          <p key={i}>{l}</p>
        ))}
        <div className="dialog-buttons">
          <button type="button" className="button-safe" onClick={onNo} autoFocus>
            No, change nothing <kbd>Enter</kbd>
          </button>
          <button type="button" className="button-risk" onClick={onYes}>
            {request.yesLabel} <kbd>y</kbd>
          </button>
        </div>
      </div>
    </div>
  );
}
