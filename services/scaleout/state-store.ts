// Where a shore processor keeps each site's processor state for the next owner of its partition
// (deploy/SCALING.md). An entry is the processor snapshot plus the raw-topic partition and the offset of
// the first message it does not include, so the owner that restores it skips exactly what it covers.
// This store is a shared directory: one JSON file per site, written atomically (temp file, fsync, rename,
// fsync of the folder), so a crash leaves the old or the new entry, never half of one.
import { mkdir, open, readFile, rename } from 'node:fs/promises';
import path from 'node:path';
import { ID_PATTERN } from '../../libs/contract/index.js';
import type { ProcessorState } from '../../libs/processor/index.js';
import { ScaleoutError } from './errors.js';

export { ScaleoutError };

export interface SiteStateEntry {
  site: string;
  partition: number;
  /** Offset (decimal string, Kafka's form) of the first raw message on `partition` not in `state`. */
  offset: string;
  state: ProcessorState;
  savedAt: string;
}

export interface SiteStateStore {
  load(site: string): Promise<SiteStateEntry | undefined>;
  save(entry: SiteStateEntry): Promise<void>;
}

export function createDirectoryStateStore(dir: string): SiteStateStore {
  const fileOf = (site: string): string => {
    if (!ID_PATTERN.test(site))
      throw new ScaleoutError('REEFD_SCALEOUT_BAD_SITE', `site id "${site}" cannot name a state file`);
    return path.join(dir, `${site}.state.json`);
  };
  return {
    async load(site) {
      let text: string;
      try {
        text = await readFile(fileOf(site), 'utf8');
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
        throw err;
      }
      const e = JSON.parse(text) as SiteStateEntry;
      if (e.site !== site || typeof e.offset !== 'string' || typeof e.state !== 'object')
        throw new ScaleoutError(
          'REEFD_SCALEOUT_STATE_CORRUPT',
          `state file of site ${site} is not a state entry; move it aside to start the site cold`,
        );
      return e;
    },
    async save(entry) {
      await mkdir(dir, { recursive: true });
      const file = fileOf(entry.site);
      const tmp = `${file}.tmp-${process.pid}`;
      const fh = await open(tmp, 'w', 0o600);
      try {
        await fh.writeFile(JSON.stringify(entry));
        await fh.sync();
      } finally {
        await fh.close();
      }
      await rename(tmp, file);
      const d = await open(dir, 'r');
      try {
        await d.sync();
      } finally {
        await d.close();
      }
    },
  };
}
