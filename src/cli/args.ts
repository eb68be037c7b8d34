// Flag parsing on node's own parseArgs, with one help text per command and errors users can act on.
import { parseArgs, type ParseArgsConfig } from 'node:util';

export class UsageError extends Error {
  constructor(message: string, readonly command?: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export type Options = NonNullable<ParseArgsConfig['options']>;

export interface Parsed {
  readonly values: Record<string, string | boolean | string[] | undefined>;
  readonly positionals: string[];
}

export function parse(command: string, argv: string[], options: Options, positionals: number): Parsed {
  let parsed: Parsed;
  try {
    parsed = parseArgs({ args: argv, options: { ...options, help: { type: 'boolean', short: 'h' }, debug: { type: 'boolean' } }, allowPositionals: true, strict: true });
  } catch (e) {
    throw new UsageError((e as Error).message.replace(/\. To specify a positional.*$/s, '.'), command);
  }
  if (!parsed.values.help && parsed.positionals.length !== positionals) {
    throw new UsageError(`takes ${positionals} file argument${positionals === 1 ? '' : 's'}, got ${parsed.positionals.length}.`, command);
  }
  return parsed;
}

export function text(p: Parsed, name: string): string | undefined {
  const v = p.values[name];
  return typeof v === 'string' ? v : undefined;
}

export function flag(p: Parsed, name: string): boolean {
  return p.values[name] === true;
}

export function list(p: Parsed, name: string): string[] {
  const v = p.values[name];
  if (Array.isArray(v)) return v.flatMap((s) => s.split(',')).map((s) => s.trim()).filter(Boolean);
  return typeof v === 'string' ? v.split(',').map((s) => s.trim()).filter(Boolean) : [];
}

/**
 * A whole number written in plain digits: "1e9", "0x10", "10.5" and "1_000" are refused rather than read as
 * something the user may not have meant. `max` names the limit in the message, and `over` the flag that lifts it.
 */
export function wholeNumber(p: Parsed, name: string, min: number, max?: number, over?: string): number | undefined {
  const v = text(p, name);
  if (v === undefined) return undefined;
  const n = /^\+?\d{1,16}$/.test(v.trim()) ? Number(v.trim()) : NaN;
  if (!Number.isSafeInteger(n) || n < min) throw new UsageError(`--${name} takes a whole number of at least ${min}, written in digits; got "${v}".`);
  if (max !== undefined && n > max) {
    throw new UsageError(`--${name} ${v} is more than the limit of ${max.toLocaleString('en-US')}${over ? `; ${over}` : ''}.`);
  }
  return n;
}

export function fraction(p: Parsed, name: string): number | undefined {
  const v = text(p, name);
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!(n > 0 && n < 1)) throw new UsageError(`--${name} takes a fraction between 0 and 1, such as 0.25; got "${v}".`);
  return n;
}

export function choice<T extends string>(p: Parsed, name: string, options: readonly T[]): T | undefined {
  const v = text(p, name);
  if (v === undefined) return undefined;
  if (!options.includes(v as T)) throw new UsageError(`--${name} takes one of ${options.join(', ')}; got "${v}".`);
  return v as T;
}
