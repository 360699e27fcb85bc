/**
 * Opens a ledger: WAL journal (readers never block the scan, and a killed process leaves the
 * last committed transaction intact), synchronous FULL (a committed event survives power loss
 * too; one commit per event costs little), foreign keys on, numbered migrations applied in order
 * inside one transaction each.
 */
import Database from 'better-sqlite3';
import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { MIGRATIONS } from './migrations/index.js';
import { LedgerErrorCode, ledgerError } from './ledger-errors.js';

export type Ledger = Database.Database;

const APP_ID = 0x4d56_5346; // "MVSF": marks the file as a Movesift ledger

export function openLedger(file: string, o: { create?: boolean; readonly?: boolean } = {}): Ledger {
  const exists = existsSync(file);
  if (!exists && !o.create) throw ledgerError(LedgerErrorCode.missing, `${file}: no such ledger; run \`movesift scan <folder> --ledger ${file}\` first`);
  let db: Ledger;
  try {
    if (!exists) mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
    db = new Database(file, { readonly: o.readonly ?? false, fileMustExist: !o.create });
  } catch (e) {
    throw ledgerError(LedgerErrorCode.unwritable, `${file}: cannot open the ledger here (${(e as Error).message}); choose a folder you can write to`);
  }
  try {
    const appId = db.pragma('application_id', { simple: true }) as number;
    const version = db.pragma('user_version', { simple: true }) as number;
    if (exists && appId !== APP_ID && !(appId === 0 && version === 0 && isEmpty(db))) {
      throw ledgerError(LedgerErrorCode.notLedger, `${file}: is not a Movesift ledger; give a new file name or an existing ledger`);
    }
    if (version > MIGRATIONS.length) {
      throw ledgerError(LedgerErrorCode.newer, `${file}: was written by a newer Movesift (schema ${version}, this one knows ${MIGRATIONS.length}); update Movesift`);
    }
    if (!o.readonly) {
      db.pragma('journal_mode = WAL');
      db.pragma('synchronous = FULL');
      db.pragma('busy_timeout = 10000');
    }
    db.pragma('foreign_keys = ON');
    if (!o.readonly) migrate(db, version);
    else if (version < MIGRATIONS.length && version > 0) {
      // A reader of a ledger an older Movesift wrote: bring it up to date once through a
      // writing connection (each migration is one transaction), then read as asked.
      db.close();
      openLedger(file).close();
      return openLedger(file, o);
    }
    return db;
  } catch (e) {
    db.close();
    if ((e as { code?: string }).code?.startsWith('E_LEDGER')) throw e;
    if ((e as { code?: string }).code === 'SQLITE_NOTADB') throw ledgerError(LedgerErrorCode.notLedger, `${file}: is not a Movesift ledger (not a database at all); give a new file name or an existing ledger`);
    throw ledgerError(LedgerErrorCode.unwritable, `${file}: cannot use the ledger (${(e as Error).message}); check the disk and the file's permissions`);
  }
}

function isEmpty(db: Ledger): boolean {
  return (db.prepare("SELECT count(*) AS n FROM sqlite_master").get() as { n: number }).n === 0;
}

function migrate(db: Ledger, from: number): void {
  for (let v = from; v < MIGRATIONS.length; v++) {
    db.transaction(() => {
      db.exec(MIGRATIONS[v]);
      db.pragma(`user_version = ${v + 1}`);
      db.pragma(`application_id = ${APP_ID}`);
    }).immediate();
  }
}
