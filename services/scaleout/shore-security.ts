// How a shore member connects to its Kafka (deploy/SCALING.md 3): TLS files and SASL credentials come from
// the site files themselves, as the daemon reads them, so no secret is ever given on the command line. A
// site file's `sources.kafka` names them (the shore reads the raw topic as a Kafka source), else its
// `bridge.kafka` (the edge's connection to the same raw topic). Every site file that names any must name
// the same ones: one member has one connection.
import path from 'node:path';
import { ReefdError, type ReefdConfig } from '../../libs/contract/index.js';
import { resolveSasl, tlsFiles } from '../daemon/outputs.js';
import type { TlsFiles } from '../transport/tls.js';

export interface ShoreKafkaSecurity {
  tls: TlsFiles | undefined;
  sasl:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  /** The site file the settings were taken from (for the log), or undefined when none gives any. */
  from: string | undefined;
}

/** The Kafka section of one site file that describes the raw topic's connection, if any. */
function kafkaSection(config: ReefdConfig) {
  return config.sources?.kafka ?? config.bridge?.kafka;
}

/**
 * Resolves TLS file paths (relative to each site file) and the SASL password (its secret reference, with
 * `env`) for every site file, and requires them to agree. Throws REEFD_USAGE naming both files when two
 * differ, and the loader's secret error when a password cannot be read.
 */
export async function shoreKafkaSecurity(
  sites: readonly { config: ReefdConfig; file: string }[],
  env: Readonly<Record<string, string | undefined>>,
): Promise<ShoreKafkaSecurity> {
  let chosen: ShoreKafkaSecurity = { tls: undefined, sasl: undefined, from: undefined };
  let chosenKey = '';
  for (const { config, file } of sites) {
    const k = kafkaSection(config);
    if (k === undefined || (k.tls === undefined && k.sasl === undefined)) continue;
    const baseDir = path.dirname(path.resolve(file));
    const tls = tlsFiles(baseDir, k.tls);
    const sasl = await resolveSasl({ env, baseDir }, k.sasl);
    const key = JSON.stringify({ tls, sasl });
    if (chosen.from === undefined) {
      chosen = { tls, sasl, from: file };
      chosenKey = key;
    } else if (key !== chosenKey) {
      throw new ReefdError(
        'REEFD_USAGE',
        `${file} and ${chosen.from} give different Kafka TLS or SASL settings; a shore member has one ` +
          'Kafka connection, so make the tls and sasl of their sources.kafka (or bridge.kafka) sections the same',
      );
    }
  }
  return chosen;
}
