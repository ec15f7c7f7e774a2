import { loadConfig, type Config } from '../config/config.ts';
import { isNearcastError } from '../errors.ts';
import type { InputLimits } from '../contracts/primitives.ts';

// Shared by the subcommands: configuration from the environment (validated once), and errors turned into one
// readable line and an exit code instead of a stack trace.

export function configFromEnvironment(overrides?: Record<string, unknown>): Config {
  return loadConfig({ env: process.env, ...(overrides ? { overrides } : {}) });
}

export function inputLimits(config: Config): InputLimits {
  return { ...config.limits };
}

/** Runs a command body; a NearcastError prints its code and message (no stack) and exits 1 (2 for configuration). */
export async function runCommand(body: () => Promise<number | void>): Promise<void> {
  try {
    const code = await body();
    if (typeof code === 'number') process.exitCode = code;
  } catch (error) {
    if (isNearcastError(error)) {
      console.error(`nearcast: ${error.code}: ${error.message}`);
      process.exitCode = error.code === 'NEARCAST_CONFIG_INVALID' ? 2 : 1;
      return;
    }
    throw error;
  }
}

export function parsePositiveInt(name: string, value: string): number {
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1) throw new TypeError(`--${name} must be a positive whole number, got ${value}`);
  return n;
}
