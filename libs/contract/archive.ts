// Raw archive lines (docs/contract-v1.md, section 2): one received message per NDJSON line.
import { z } from 'zod';

export const archiveLineSchema = z.object({
  topic: z.string().min(1).max(512),
  rx: z.string().max(40),
  // The payload exactly as received when it was JSON; a non-JSON payload is kept as a string.
  msg: z.unknown(),
  reject: z.string().max(200).optional(),
});

export type ArchiveLine = z.infer<typeof archiveLineSchema>;

/** Builds the archive line for a received payload. A payload that is not JSON is stored as its text. */
export function archiveLine(
  topic: string,
  rxIso: string,
  payloadText: string,
  rejectReason?: string,
): string {
  let msg: unknown;
  try {
    msg = JSON.parse(payloadText);
  } catch {
    msg = payloadText;
  }
  const line: ArchiveLine = { topic, rx: rxIso, msg };
  if (rejectReason !== undefined) line.reject = rejectReason;
  return JSON.stringify(line);
}

export type ArchiveLineParse = { ok: true; line: ArchiveLine } | { ok: false; reason: string };

export function parseArchiveLine(text: string): ArchiveLineParse {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    return { ok: false, reason: 'json_syntax' };
  }
  const r = archiveLineSchema.safeParse(raw);
  if (!r.success) return { ok: false, reason: `bad_archive_line:${r.error.issues[0]?.path.join('.') ?? ''}` };
  return { ok: true, line: r.data };
}
