// Names of the raw archive's daily files (contract section 2): `raw-YYYY-MM-DD.ndjson`, by UTC day of the
// receive time, gzip-compressed to `raw-YYYY-MM-DD.ndjson.gz` once the day has closed.
import { open, type FileHandle } from 'node:fs/promises';

export const ARCHIVE_FILE = /^raw-(\d{4}-\d{2}-\d{2})\.ndjson(\.gz)?$/;
export const DAY_MS = 86_400_000;

/** UTC day number since the epoch. */
export function dayOf(ms: number): number {
  return Math.floor(ms / DAY_MS);
}

export function dayName(day: number): string {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

export function plainName(day: number): string {
  return `raw-${dayName(day)}.ndjson`;
}

/** The day number of an archive file name, or undefined for other files. */
export function dayOfName(name: string): number | undefined {
  const m = ARCHIVE_FILE.exec(name);
  return m?.[1] !== undefined ? dayOf(Date.parse(`${m[1]}T00:00:00Z`)) : undefined;
}

/** The few file operations the writer needs; tests replace them to simulate a full disk. */
export interface AppendFile {
  size(): Promise<number>;
  readLastByte(size: number): Promise<number | undefined>;
  write(data: Buffer): Promise<void>;
  sync(): Promise<void>;
  truncate(size: number): Promise<void>;
  close(): Promise<void>;
}

export type OpenAppendFile = (path: string) => Promise<AppendFile>;

export const openAppendFile: OpenAppendFile = async (path) => {
  const fh: FileHandle = await open(path, 'a+');
  return {
    size: async () => (await fh.stat()).size,
    readLastByte: async (size) => {
      if (size === 0) return undefined;
      const buf = Buffer.alloc(1);
      await fh.read(buf, 0, 1, size - 1);
      return buf[0];
    },
    write: async (data) => {
      let off = 0;
      while (off < data.length) {
        const { bytesWritten } = await fh.write(data, off, data.length - off);
        off += bytesWritten;
      }
    },
    sync: () => fh.sync(),
    truncate: (size) => fh.truncate(size),
    close: () => fh.close(),
  };
};
