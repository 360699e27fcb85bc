/** Migrations in order; the ledger's user_version is the number of the last one applied. */
import { sql as m0001 } from './0001-initial.js';
import { sql as m0002 } from './0002-review-indexes.js';

export const MIGRATIONS: readonly string[] = [m0001, m0002];
