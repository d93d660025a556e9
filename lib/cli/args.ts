import { UsageError } from "../errors";

/** Parsed command line: positionals, and every --flag with its values in order. */
export interface ParsedArgs {
  positionals: string[];
  flags: Map<string, string[]>;
}

/**
 * Parses `--name value`, `--name=value` and bare `--switch` (for the names in `switches`).
 * Throws UsageError for a flag not in `known` or a flag missing its value.
 */
export function parseArgs(
  argv: readonly string[],
  known: readonly string[],
  switches: readonly string[] = [],
): ParsedArgs {
  const positionals: string[] = [];
  const flags = new Map<string, string[]>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i] ?? "";
    if (!arg.startsWith("--") || arg === "--") {
      if (arg !== "--") positionals.push(arg);
      continue;
    }
    const eq = arg.indexOf("=");
    const name = eq > 0 ? arg.slice(2, eq) : arg.slice(2);
    if (!known.includes(name) && !switches.includes(name)) {
      throw new UsageError(`unknown option --${name}`);
    }
    let value: string;
    if (switches.includes(name)) {
      value = eq > 0 ? arg.slice(eq + 1) : "true";
    } else if (eq > 0) {
      value = arg.slice(eq + 1);
    } else {
      const next = argv[i + 1];
      if (next === undefined || next.startsWith("--"))
        throw new UsageError(`--${name} needs a value`);
      value = next;
      i++;
    }
    flags.set(name, [...(flags.get(name) ?? []), value]);
  }
  return { positionals, flags };
}

export function flag(args: ParsedArgs, name: string): string | undefined {
  const values = args.flags.get(name);
  return values?.[values.length - 1];
}

export function hasSwitch(args: ParsedArgs, name: string): boolean {
  return flag(args, name) === "true";
}

/** A numeric flag within [min, max], or the fallback when absent. */
export function numberFlag(
  args: ParsedArgs,
  name: string,
  fallback: number | undefined,
  min: number,
  max: number,
  integer = false,
): number | undefined {
  const raw = flag(args, name);
  if (raw === undefined) return fallback;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < min || v > max || (integer && !Number.isInteger(v))) {
    throw new UsageError(
      `--${name} must be ${integer ? "a whole number" : "a number"} from ${min} to ${max}, got "${raw}"`,
    );
  }
  return v;
}

export function choiceFlag<T extends string>(
  args: ParsedArgs,
  name: string,
  choices: readonly T[],
  fallback: T,
): T {
  const raw = flag(args, name);
  if (raw === undefined) return fallback;
  const found = choices.find((c) => c === raw);
  if (!found) throw new UsageError(`--${name} must be one of ${choices.join(", ")}, got "${raw}"`);
  return found;
}
