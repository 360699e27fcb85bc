/** Flag parsing on node:util parseArgs, turning its errors into usage errors. */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { usageError } from './cli-errors.js';

export type Flags = Record<string, string | boolean | string[] | undefined>;

/** `T` names the flags' value types as the command reads them; parseArgs guarantees the kinds. */
export function parse<T extends Flags>(argv: string[], options: NonNullable<ParseArgsConfig['options']>, command: string): { values: T & { help?: boolean }; positionals: string[] } {
  try {
    const r = parseArgs({ args: argv, options: { ...options, help: { type: 'boolean', short: 'h' } }, allowPositionals: true, strict: true });
    return { values: r.values as T & { help?: boolean }, positionals: r.positionals };
  } catch (e) {
    throw usageError(`${plainParseError(e as Error & { code?: string })} See \`movesift ${command} --help\`.`);
  }
}

/** node:util parseArgs's messages, said as a person would (its codes are documented; the text is
 *  its own, so the option's name is read out of it). */
function plainParseError(e: Error & { code?: string }): string {
  const opt = /'(-{1,2}[\w-]+)/.exec(e.message)?.[1];
  if (e.code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') return `${opt ?? 'that option'} is not an option of this command.`;
  if (e.code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE') return /argument missing/.test(e.message) ? `${opt ?? 'an option'} needs a value after it.` : `${opt ?? 'an option'} takes no value.`;
  return `${e.message.split('\n')[0]}.`;
}

export function numberFlag(name: string, v: string | undefined, lo: number, hi: number, integer = false): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!Number.isFinite(x) || x < lo || x > hi || (integer && !Number.isInteger(x))) {
    throw usageError(`--${name}: wanted ${integer ? 'integer' : 'number'} ${lo}-${hi}, got ${JSON.stringify(v)}`);
  }
  return x;
}
