// The sites a shore member derives: each configuration file with its calibration file and field log
// (relative to the configuration file, as the daemon reads them), so a shore member's records equal the
// single daemon's for the same files (deploy/SCALING.md).
import path from 'node:path';
import { ReefdError, type ReefdConfig } from '../../libs/contract/index.js';
import type { ProcessorOptions } from '../../libs/processor/index.js';
import { loadFieldFiles } from '../config/field-files.js';
import { loadConfigOrThrow } from '../config/load.js';

export interface ShoreSites {
  sites: ReefdConfig[];
  /** Per site: the processor's options built from its calibration file and field log. */
  processorOptions: Map<string, ProcessorOptions>;
}

/** Loads and checks every site file; throws the loader's catalogued error for the first bad one. */
export async function loadShoreSites(files: readonly string[]): Promise<ShoreSites> {
  const sites: ReefdConfig[] = [];
  const processorOptions = new Map<string, ProcessorOptions>();
  for (const file of files) {
    const config = await loadConfigOrThrow(file);
    if (processorOptions.has(config.site))
      throw new ReefdError(
        'REEFD_USAGE',
        `${file}: site ${config.site} is already given by another --site file`,
      );
    sites.push(config);
    processorOptions.set(
      config.site,
      (await loadFieldFiles(path.dirname(path.resolve(file)), config)).options,
    );
  }
  return { sites, processorOptions };
}
