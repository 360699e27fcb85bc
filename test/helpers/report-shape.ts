/**
 * Checks a report against the `movesift.report/1` shape documented in ../shared/DESIGN.md
 * ("Contracts"), field by field. Returns the list of problems (empty when the shape holds).
 */
const ISO = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?(Z|[+-]\d{2}:\d{2})?$/;

export function reportProblems(r: unknown): string[] {
  const p: string[] = [];
  const doc = r as Record<string, unknown>;
  if (doc?.schema !== 'movesift.report/1') p.push(`schema is ${JSON.stringify(doc?.schema)}`);
  if (!Array.isArray(doc?.events)) return [...p, 'events is not an array'];
  if (!Array.isArray(doc?.errors)) p.push('errors is not an array');
  (doc.events as Record<string, unknown>[]).forEach((e, i) => {
    const at = `events[${i}]`;
    if (typeof e.id !== 'string' || !e.id) p.push(`${at}.id`);
    if (!['burst', 'single', 'clip'].includes(e.kind as string)) p.push(`${at}.kind ${e.kind}`);
    if (typeof e.deployment !== 'string') p.push(`${at}.deployment`);
    if (!Array.isArray(e.files) || !e.files.length || e.files.some((f) => typeof f !== 'string' || f.startsWith('/') || f.includes('\\'))) p.push(`${at}.files`);
    if (!ISO.test(String(e.start)) || !ISO.test(String(e.end))) p.push(`${at}.start/end ${e.start} ${e.end}`);
    if (!['likely-blank', 'unsure', 'motion'].includes(e.verdict as string)) p.push(`${at}.verdict`);
    if (typeof e.score !== 'number' || !(e.score >= 0 && e.score <= 1)) p.push(`${at}.score`);
    if (!Array.isArray(e.windows) || (e.windows as Record<string, unknown>[]).some((w) => typeof w.start_s !== 'number' || typeof w.end_s !== 'number' || typeof w.score !== 'number' || (w.end_s as number) < (w.start_s as number))) p.push(`${at}.windows`);
    if (!(e.decision === null || e.decision === 'keep' || e.decision === 'set-aside')) p.push(`${at}.decision`);
    // Added fields (the contract allows additions): which rule decided the verdict.
    if (!['model', 'deployment'].includes(e.rule as string)) p.push(`${at}.rule ${e.rule}`);
  });
  if (!Array.isArray(doc.calibrations)) p.push('calibrations is not an array');
  ((doc.calibrations as Record<string, unknown>[]) ?? []).forEach((c, i) => {
    if (typeof c.deployment !== 'string' || typeof c.light !== 'string' || !['applied', 'too-few', 'busy', 'labels', 'off'].includes(c.status as string) || typeof c.cut !== 'number' || typeof c.fittedBlank !== 'number' || (c.cut as number) < (c.fittedBlank as number) - 1e-9 && c.status !== 'labels') p.push(`calibrations[${i}]`);
  });
  ((doc.errors as Record<string, unknown>[]) ?? []).forEach((e, i) => {
    if (typeof e.file !== 'string' || typeof e.code !== 'string' || !/^E_[A-Z_]+$/.test(e.code as string) || typeof e.message !== 'string') p.push(`errors[${i}]`);
  });
  return p;
}
