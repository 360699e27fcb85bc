/** Entry: asks the backend which ledger is open, then shows the app. */
import { createRoot } from 'react-dom/client';
import { App } from './app';
import { api } from './shared/api';
import './styles.css';

const root = createRoot(document.getElementById('root')!);
api
  .session()
  .then((s) => root.render(<App initial={s} />))
  .catch((e: Error) => root.render(<p className="error-text">Movesift could not reach its backend: {e.message}</p>));
