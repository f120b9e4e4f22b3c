// Reads a configuration file, validates it (libs/contract) and resolves secret references.
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import {
  CORE_ERRORS,
  parseConfigText,
  ReefdError,
  type ConfigParse,
  type ReefdConfig,
  type SecretRef,
} from '../../libs/contract/index.js';

/** The data folder when the configuration names none and systemd gives no StateDirectory. */
export const DEFAULT_DATA_DIR = 'reefd-data';

/**
 * The data folder, absolute: `data_dir` (relative to the configuration's folder); else the first folder of
 * systemd's `$STATE_DIRECTORY` (the shipped unit's `StateDirectory=reefd`, /var/lib/reefd: writable under
 * its sandbox, unlike the configuration's folder); else `reefd-data` beside the configuration file.
 */
export function resolveDataDir(
  config: Pick<ReefdConfig, 'data_dir'>,
  baseDir: string,
  env: Readonly<Record<string, string | undefined>>,
): string {
  if (config.data_dir !== undefined) return path.resolve(baseDir, config.data_dir);
  const state = env.STATE_DIRECTORY?.split(':')[0];
  if (state !== undefined && state !== '') return path.resolve(state);
  return path.resolve(baseDir, DEFAULT_DATA_DIR);
}

export async function loadConfigFile(file: string): Promise<ConfigParse> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (err) {
    throw CORE_ERRORS.error('REEFD_CONFIG_UNREADABLE', `cannot read ${file}: ${(err as Error).message}`, {
      cause: err,
      detail: { file },
    });
  }
  return parseConfigText(text);
}

/** Loads and validates, throwing REEFD_CONFIG_INVALID with every problem attached. */
export async function loadConfigOrThrow(file: string): Promise<ReefdConfig> {
  const r = await loadConfigFile(file);
  if (!r.ok) {
    throw new ReefdError('REEFD_CONFIG_INVALID', `${file} has ${r.problems.length} problem(s)`, {
      detail: { problems: r.problems },
    });
  }
  return r.config;
}

/**
 * Resolves a secret reference. Files must not be readable by group or others (mode 0600 or 0400),
 * so a secret cannot leak through a world-readable file; relative paths are relative to `baseDir`.
 */
export async function resolveSecret(
  ref: SecretRef,
  env: Readonly<Record<string, string | undefined>>,
  baseDir = '.',
): Promise<string> {
  if ('env' in ref) {
    const v = env[ref.env];
    if (v === undefined || v === '') {
      throw new ReefdError('REEFD_SECRET_MISSING', `environment variable ${ref.env} is not set`);
    }
    return v;
  }
  const file = path.resolve(baseDir, ref.file);
  let mode: number;
  try {
    mode = (await stat(file)).mode;
  } catch {
    throw new ReefdError('REEFD_SECRET_MISSING', `secret file ${file} does not exist`);
  }
  if ((mode & 0o077) !== 0) {
    throw new ReefdError(
      'REEFD_SECRET_PERMISSIONS',
      `secret file ${file} has mode ${(mode & 0o777).toString(8)}; run chmod 600 ${file}`,
    );
  }
  return (await readFile(file, 'utf8')).trim();
}
