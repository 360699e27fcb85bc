/**
 * When a set-aside needs a second look, and the words that say why. Setting aside is only a mark
 * (nothing moves until someone applies), but a wrong mark can still cost an animal later, so we
 * ask whenever many events go at once or the screener saw motion in any of them.
 */
import type { LastBatch, Verdict } from '../../../../src/shared/review-api';
import type { ConfirmRequest } from './confirm-dialog';
import { count } from './format';

/** Above this many events a set-aside is confirmed (common practice for bulk destructive-looking actions; our choice). */
export const BULK_CONFIRM_AT = 10;

export function setAsideWarning(n: number, verdicts: Readonly<Record<Verdict, number>>): ConfirmRequest | null {
  const risky = verdicts.motion + verdicts.unsure;
  if (n < BULK_CONFIRM_AT && verdicts.motion === 0) return null;
  const lines = n === 1 ? [] : [`${count(verdicts['likely-blank'])} likely blank, ${count(verdicts.unsure)} unsure, ${count(verdicts.motion)} motion.`];
  if (verdicts.motion > 0 && n === 1) lines.push('The screener saw motion in this event: an animal may be there. Look at it before setting it aside.');
  else if (verdicts.motion > 0) lines.push(`The screener saw motion in ${count(verdicts.motion)} of them: an animal may be there. Look at those before setting them aside.`);
  else if (risky > 0) lines.push(`${count(risky)} of them the screener was unsure about.`);
  lines.push('Set-aside events are only marked: nothing is moved until someone applies the decisions, and u undoes this.');
  return { title: `Set aside ${count(n)} event${n === 1 ? '' : 's'}?`, lines, yesLabel: `Yes, set aside ${count(n)}` };
}

/** Keeping events whose files an apply already moved: keeping means the files belong back where
 *  they came from, so the question says how many will be put back. */
export function keepMovedQuestion(n: number, movedEvents: number, files: number): ConfirmRequest {
  return {
    title: `Keep ${count(n)} event${n === 1 ? '' : 's'} and put back ${count(files)} file${files === 1 ? '' : 's'}?`,
    lines: [
      `${n === 1 ? 'Its files are' : `${count(movedEvents)} of these events have their files`} in the set-aside folder already: an apply moved them.`,
      'Keeping puts them back where they came from, each checked against the SHA-256 taken when it was moved.',
    ],
    yesLabel: `Yes, keep and put back ${count(files)}`,
  };
}

/** Undoing decisions someone else made, or a command did: say whose, how and when. */
export function undoQuestion(b: LastBatch): ConfirmRequest {
  const what = b.decision === 'keep' ? 'kept' : 'set aside';
  const how = b.source === 'command' ? 'with the movesift decide command' : 'in the app';
  return {
    title: `Undo ${count(b.events)} decision${b.events === 1 ? '' : 's'} made by ${b.who ?? 'someone unnamed'}?`,
    lines: [`The latest decisions were made ${how} by ${b.who ?? 'someone unnamed'} at ${b.at.replace('T', ' ').replace(/\.\d+Z$|Z$/, ' UTC')}: ${count(b.events)} event${b.events === 1 ? '' : 's'} ${what}.`, 'Undo puts back the decisions those events had before; it moves no file.'],
    yesLabel: `Yes, undo ${count(b.events)}`,
  };
}
