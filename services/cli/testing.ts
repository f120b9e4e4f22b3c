// A captured CliIo for command tests.
import type { CliIo } from './io.js';

export interface CapturedIo extends CliIo {
  out: string[];
  err: string[];
  text(): { stdout: string; stderr: string };
}

export function captureIo(env: Record<string, string | undefined> = {}): CapturedIo {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    env,
    isTty: false,
    stdout: (s) => void out.push(s),
    stderr: (s) => void err.push(s),
    text: () => ({ stdout: out.join(''), stderr: err.join('') }),
  };
}
