/** Migrations in order; the ledger's user_version is the number of the last one applied. */
import { sql as m0001 } from './0001-initial.js';
import { sql as m0002 } from './0002-review-indexes.js';
import { sql as m0003 } from './0003-apply-and-audit.js';
import { sql as m0004 } from './0004-deployment-calibration.js';
import { sql as m0005 } from './0005-passed-over.js';
import { sql as m0006 } from './0006-merges.js';
import { sql as m0007 } from './0007-second-opinions.js';

export const MIGRATIONS: readonly string[] = [m0001, m0002, m0003, m0004, m0005, m0006, m0007];
