// Secret references of the notify: config ({ env: NAME } or { file: PATH }), resolved once at start-up.

import { readFile } from 'node:fs/promises';
import type { SecretRef } from '../../libs/alerts/index.js';

export async function resolveSecret(
  ref: SecretRef,
  env: Readonly<Record<string, string | undefined>>,
  read: (path: string) => Promise<string> = (p) => readFile(p, 'utf8'),
): Promise<string> {
  if ('env' in ref) {
    const v = env[ref.env];
    if (v === undefined || v === '') {
      throw new Error(
        `REEFD_NOTIFY_SECRET_MISSING: environment variable ${ref.env} is not set; export it or use { file: PATH }`,
      );
    }
    return v;
  }
  let text: string;
  try {
    text = await read(ref.file);
  } catch (err) {
    throw new Error(
      `REEFD_NOTIFY_SECRET_MISSING: cannot read secret file ${ref.file} (${(err as Error).message}); check the path and its permissions`,
      { cause: err },
    );
  }
  const v = text.replace(/\r?\n$/, ''); // one trailing newline is an editor's, not the secret's
  if (v === '') throw new Error(`REEFD_NOTIFY_SECRET_MISSING: secret file ${ref.file} is empty`);
  return v;
}
