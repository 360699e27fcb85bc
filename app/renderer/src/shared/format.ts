/** Words and numbers as the grid and detail views show them. */
import type { Decision, Light, Verdict } from '../../../../src/shared/review-api';

export const VERDICT_LABEL: Record<Verdict, string> = { 'likely-blank': 'likely blank', unsure: 'unsure', motion: 'motion' };
export const DECISION_LABEL: Record<Decision, string> = { keep: 'kept', 'set-aside': 'set aside' };
export const LIGHT_LABEL: Record<Light, string> = { colour: 'day', infrared: 'night (IR)' };

/** "2024-05-03 06:12:09" from an ISO time, keeping the camera's own clock (no time-zone shift). */
export function shortTime(iso: string): string {
  const m = /^(\d{4}-\d\d-\d\d)T(\d\d:\d\d:\d\d)/.exec(iso);
  return m ? `${m[1]} ${m[2]}` : iso;
}

export const seconds = (s: number): string => {
  const m = Math.floor(s / 60);
  return `${m}:${(s - m * 60).toFixed(1).padStart(4, '0')}`;
};

export const count = (n: number): string => n.toLocaleString('en');
